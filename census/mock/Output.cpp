#include "census/mock/Output.h"

#include "photometry/base/AtomicOutput.h"

#include <cmath>
#include <numbers>

namespace starcensus::census::mock {

using photometry::CatalogRow;
using photometry::FitsColumn;
using photometry::FitsColumnType;

namespace {

// Column order of mockCatalogColumns().
enum Column : std::size_t {
    kSourceId,
    kRa,
    kDec,
    kParallax,
    kParallaxError,
    kPmra,
    kPmdec,
    kG,
    kBp,
    kRp,
    kGFluxOverError,
    kBpFluxOverError,
    kRpFluxOverError,
    kJ,
    kH,
    kKs,
    kRuwe,
    kJError,
    kHError,
    kKsError,
};

// Flux signal-to-noise of a magnitude error: sigma_mag = (2.5 / ln 10) sigma_flux / flux.
float fluxOverError(double error_mag) {
    return static_cast<float>(2.5 / std::numbers::ln10 / error_mag);
}

nlohmann::json number(double value) {
    return std::isnan(value) ? nlohmann::json(nullptr) : nlohmann::json(value);
}

nlohmann::json classCounts(const std::array<std::int64_t, photometry::kClassCount>& counts) {
    nlohmann::json out = nlohmann::json::object();
    std::int64_t total = 0;
    for (std::size_t i = 0; i < photometry::kClassCount; ++i) {
        out[std::string(photometry::kClassNames[i])] = counts[i];
        total += counts[i];
    }
    out["total"] = total;
    return out;
}

nlohmann::json countsJson(const std::vector<RadiusCounts>& counts, bool with_companion) {
    nlohmann::json out = nlohmann::json::array();
    for (const RadiusCounts& within : counts) {
        nlohmann::json entry = {{"radius_pc", within.radius_pc},
                                {"objects", classCounts(within.all)},
                                {"catalogued", classCounts(within.catalogued)},
                                {"components", classCounts(within.components)}};
        if (with_companion) {
            entry["in_companion"] = classCounts(within.in_companion);
            entry["in_both_files"] = classCounts(within.in_both);
            entry["in_either_file"] = classCounts(within.in_any_file);
        }
        out.push_back(std::move(entry));
    }
    return out;
}

// Both catalogues' astrometry: ra, dec, parallax, parallax_error (single precision), pmra, pmdec in
// consecutive columns from `first`.
void appendAstrometry(photometry::FitsRowBlock& block, std::size_t first, const CatalogRow& row) {
    block.values<double>(first).push_back(row.ra_deg);
    block.values<double>(first + 1).push_back(row.dec_deg);
    block.values<double>(first + 2).push_back(row.parallax_mas);
    block.values<float>(first + 3).push_back(static_cast<float>(row.parallax_error_mas));
    block.values<double>(first + 4).push_back(row.pmra_mas_per_yr);
    block.values<double>(first + 5).push_back(row.pmdec_mas_per_yr);
}

// Column order of companionCatalogColumns().
enum CompanionColumn : std::size_t {
    kCompanionRa,
    kCompanionDec,
    kCompanionParallax,
    kCompanionParallaxError,
    kCompanionPmra,
    kCompanionPmdec,
    kCompanionB,
    kCompanionBError,
    kCompanionV,
    kCompanionVError,
    kCompanionJ,
    kCompanionH,
    kCompanionKs,
    kCompanionJError,
    kCompanionHError,
    kCompanionKsError,
    kCompanionW1,
    kCompanionW1Error,
    kCompanionW2,
    kCompanionW2Error,
    kCompanionSpectralType,
};

} // namespace

std::vector<FitsColumn> mockCatalogColumns() {
    // Names, units and UCDs as in the Gaia DR3 gaia_source table and the 2MASS point-source catalogue
    // (UCDs from memory); floating-point widths as there (errors and magnitudes single precision).
    const auto col = [](const char* name, FitsColumnType type, const char* unit, const char* ucd,
                        const char* description) {
        return FitsColumn{name, type, unit, ucd, description, 0, {}};
    };
    using enum FitsColumnType;
    return {
        col("source_id", Int64, "", "meta.id;meta.main", "Unique source identifier (mock)"),
        col("ra", Float64, "deg", "pos.eq.ra;meta.main", "Right ascension (ICRS)"),
        col("dec", Float64, "deg", "pos.eq.dec;meta.main", "Declination (ICRS)"),
        col("parallax", Float64, "mas", "pos.parallax.trig", "Parallax"),
        col("parallax_error", Float32, "mas", "stat.error;pos.parallax.trig", "Standard error of parallax"),
        col("pmra", Float64, "mas/yr", "pos.pm;pos.eq.ra", "Proper motion in right ascension times cos(dec)"),
        col("pmdec", Float64, "mas/yr", "pos.pm;pos.eq.dec", "Proper motion in declination"),
        col("phot_g_mean_mag", Float32, "mag", "phot.mag;em.opt", "G-band mean magnitude (Vega)"),
        col("phot_bp_mean_mag", Float32, "mag", "phot.mag;em.opt.B", "Integrated BP mean magnitude (Vega)"),
        col("phot_rp_mean_mag", Float32, "mag", "phot.mag;em.opt.R", "Integrated RP mean magnitude (Vega)"),
        col("phot_g_mean_flux_over_error", Float32, "", "stat.snr;phot.flux;em.opt",
            "G-band mean flux divided by its error"),
        col("phot_bp_mean_flux_over_error", Float32, "", "stat.snr;phot.flux;em.opt.B",
            "Integrated BP mean flux divided by its error"),
        col("phot_rp_mean_flux_over_error", Float32, "", "stat.snr;phot.flux;em.opt.R",
            "Integrated RP mean flux divided by its error"),
        col("j_m", Float32, "mag", "phot.mag;em.IR.J", "2MASS J magnitude"),
        col("h_m", Float32, "mag", "phot.mag;em.IR.H", "2MASS H magnitude"),
        col("ks_m", Float32, "mag", "phot.mag;em.IR.K", "2MASS Ks magnitude"),
        col("ruwe", Float32, "", "stat.fit.goodness", "Renormalised unit weight error"),
        col("j_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.J", "2MASS J total uncertainty"),
        col("h_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.H", "2MASS H total uncertainty"),
        col("ks_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.K", "2MASS Ks total uncertainty"),
    };
}

MockCatalogWriter::MockCatalogWriter(const std::filesystem::path& path, const MockSettings& settings,
                                     std::uint64_t seed)
    : writer_(path, "MOCKCAT", mockCatalogColumns(),
              {{"ORIGIN", std::string("starcensus mock"), "SIMULATED catalog, not observations"},
               {"MOCKSEED", static_cast<std::int64_t>(seed), "random seed of the mock"},
               {"RADMAX", settings.radius_max_pc, "[pc] radius of the simulated sphere"},
               {"DENSITY", settings.system_density_per_pc3, "[pc-3] density of stellar systems"},
               {"IMF", imfFamilyName(settings.imf.family), "initial mass function"},
               {"BINFRAC", settings.binary_fraction, "unresolved binary fraction"},
               {"GLIMIT", settings.g_limit_mag, "[mag] survey limit in G"},
               {"DISCAGE", settings.disc_age_gyr, "[Gyr] age of the disc"}}),
      block_(writer_.makeBlock()) {}

void MockCatalogWriter::append(std::span<const CatalogRow> rows) {
    block_.clear();
    for (const CatalogRow& row : rows) {
        block_.values<std::int64_t>(kSourceId).push_back(row.source_id);
        appendAstrometry(block_, kRa, row);
        block_.values<float>(kG).push_back(row.g_mag);
        block_.values<float>(kBp).push_back(row.bp_mag);
        block_.values<float>(kRp).push_back(row.rp_mag);
        block_.values<float>(kGFluxOverError).push_back(fluxOverError(row.g_error_mag));
        block_.values<float>(kBpFluxOverError).push_back(fluxOverError(row.bp_error_mag));
        block_.values<float>(kRpFluxOverError).push_back(fluxOverError(row.rp_error_mag));
        block_.values<float>(kJ).push_back(row.j_mag);
        block_.values<float>(kH).push_back(row.h_mag);
        block_.values<float>(kKs).push_back(row.ks_mag);
        block_.values<float>(kRuwe).push_back(row.ruwe);
        block_.values<float>(kJError).push_back(row.j_error_mag);
        block_.values<float>(kHError).push_back(row.h_error_mag);
        block_.values<float>(kKsError).push_back(row.ks_error_mag);
    }
    writer_.append(block_);
}

void MockCatalogWriter::finish() {
    writer_.finish();
}

void writeMockCatalog(const std::filesystem::path& path, const MockResult& result) {
    MockCatalogWriter writer(path, result.settings, result.seed);
    constexpr std::size_t kBlockRows = 100000;
    const std::span<const CatalogRow> rows(result.catalog);
    for (std::size_t first = 0; first < rows.size(); first += kBlockRows) {
        writer.append(rows.subspan(first, std::min(kBlockRows, rows.size() - first)));
    }
    writer.finish();
}

std::vector<FitsColumn> companionCatalogColumns() {
    const auto col = [](const char* name, FitsColumnType type, const char* unit, const char* ucd,
                        const char* description) {
        return FitsColumn{name, type, unit, ucd, description, 0, {}};
    };
    using enum FitsColumnType;
    std::vector<FitsColumn> columns = {
        col("ra", Float64, "deg", "pos.eq.ra;meta.main", "Right ascension (ICRS) at the POSEPOCH epoch"),
        col("dec", Float64, "deg", "pos.eq.dec;meta.main", "Declination (ICRS) at the POSEPOCH epoch"),
        col("parallax", Float64, "mas", "pos.parallax.trig", "Trigonometric parallax"),
        col("parallax_error", Float32, "mas", "stat.error;pos.parallax.trig", "Standard error of parallax"),
        col("pmra", Float64, "mas/yr", "pos.pm;pos.eq.ra", "Proper motion in right ascension times cos(dec)"),
        col("pmdec", Float64, "mas/yr", "pos.pm;pos.eq.dec", "Proper motion in declination"),
        // Johnson B carries no UCD: em.opt.B is also Gaia BP's, and would map this column to BP.
        col("bmag", Float32, "mag", "", "Johnson B magnitude"),
        col("e_bmag", Float32, "mag", "", "Johnson B uncertainty"),
        col("vmag", Float32, "mag", "phot.mag;em.opt.V", "Johnson V magnitude"),
        col("e_vmag", Float32, "mag", "stat.error;phot.mag;em.opt.V", "Johnson V uncertainty"),
        col("j_m", Float32, "mag", "phot.mag;em.IR.J", "J magnitude (2MASS, or follow-up where fainter)"),
        col("h_m", Float32, "mag", "phot.mag;em.IR.H", "H magnitude (2MASS, or follow-up where fainter)"),
        col("ks_m", Float32, "mag", "phot.mag;em.IR.K", "Ks magnitude (2MASS, or follow-up where fainter)"),
        col("j_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.J", "J uncertainty"),
        col("h_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.H", "H uncertainty"),
        col("ks_msigcom", Float32, "mag", "stat.error;phot.mag;em.IR.K", "Ks uncertainty"),
        col("w1mpro", Float32, "mag", "phot.mag;em.IR.3-4um", "WISE W1 profile-fit magnitude"),
        col("w1sigmpro", Float32, "mag", "stat.error;phot.mag;em.IR.3-4um", "WISE W1 uncertainty"),
        col("w2mpro", Float32, "mag", "phot.mag;em.IR.4-8um", "WISE W2 profile-fit magnitude"),
        col("w2sigmpro", Float32, "mag", "stat.error;phot.mag;em.IR.4-8um", "WISE W2 uncertainty"),
        col("spectral_type", String, "", "src.spType", "Literature spectral type (blank: none)"),
    };
    columns.back().string_width = 12;
    return columns;
}

void writeCompanionCatalog(const std::filesystem::path& path, const MockResult& result) {
    const MockSettings& settings = result.settings;
    photometry::FitsTableWriter writer(
        path, "MOCKCOMP", companionCatalogColumns(),
        {{"ORIGIN", std::string("starcensus mock"), "SIMULATED catalog, not observations"},
         {"MOCKSEED", static_cast<std::int64_t>(result.seed), "random seed of the mock"},
         {"RADMAX", settings.radius_max_pc, "[pc] radius of the simulated sphere"},
         {"POSEPOCH", settings.companion.epoch_yr, "[yr] Julian epoch of ra, dec (--file-epoch)"},
         {"W2LIMIT", settings.companion.w2_limit_mag, "[mag] ultracool dwarfs: W2 detection limit"},
         {"GBRIGHT", settings.g_bright_limit_mag, "[mag] bright stars: true G below this"}});
    photometry::FitsRowBlock block = writer.makeBlock();
    for (const CompanionRow& companion : result.companion_catalog) {
        const CatalogRow& row = companion.row;
        appendAstrometry(block, kCompanionRa, row);
        block.values<float>(kCompanionB).push_back(row.b_mag);
        block.values<float>(kCompanionBError).push_back(row.b_error_mag);
        block.values<float>(kCompanionV).push_back(row.v_mag);
        block.values<float>(kCompanionVError).push_back(row.v_error_mag);
        block.values<float>(kCompanionJ).push_back(row.j_mag);
        block.values<float>(kCompanionH).push_back(row.h_mag);
        block.values<float>(kCompanionKs).push_back(row.ks_mag);
        block.values<float>(kCompanionJError).push_back(row.j_error_mag);
        block.values<float>(kCompanionHError).push_back(row.h_error_mag);
        block.values<float>(kCompanionKsError).push_back(row.ks_error_mag);
        block.values<float>(kCompanionW1).push_back(row.w1_mag);
        block.values<float>(kCompanionW1Error).push_back(row.w1_error_mag);
        block.values<float>(kCompanionW2).push_back(row.w2_mag);
        block.values<float>(kCompanionW2Error).push_back(row.w2_error_mag);
        block.values<std::string>(kCompanionSpectralType).push_back(companion.spectral_type);
    }
    writer.append(block);
    writer.finish();
}

nlohmann::json mockSettingsJson(const MockSettings& s) {
    const ImfSettings& imf = s.imf;
    return {
        {"radius_max_pc", s.radius_max_pc},
        {"system_density_per_pc3", s.system_density_per_pc3},
        {"velocity_dispersion_km_s", s.velocity_dispersion_km_s},
        {"imf",
         {{"family", imfFamilyName(imf.family)},
          {"mass_min_msun", imf.mass_min_msun},
          {"mass_max_msun", imf.mass_max_msun},
          {"kroupa_alpha_low", imf.kroupa_alpha_low},
          {"kroupa_alpha_mid", imf.kroupa_alpha_mid},
          {"kroupa_alpha_high", imf.kroupa_alpha_high},
          {"kroupa_break_low_msun", imf.kroupa_break_low_msun},
          {"kroupa_break_high_msun", imf.kroupa_break_high_msun},
          {"chabrier_peak_mass_msun", imf.chabrier_peak_mass_msun},
          {"chabrier_sigma_dex", imf.chabrier_sigma_dex},
          {"chabrier_join_msun", imf.chabrier_join_msun},
          {"chabrier_x_high", imf.chabrier_x_high}}},
        {"disc_age_gyr", s.disc_age_gyr},
        {"ms_lifetime_sun_gyr", s.ms_lifetime_sun_gyr},
        {"ms_lifetime_exponent", s.ms_lifetime_exponent},
        {"giant_phase_share", s.giant_phase_share},
        {"max_white_dwarf_progenitor_msun", s.max_white_dwarf_progenitor_msun},
        {"hydrogen_burning_limit_msun", s.hydrogen_burning_limit_msun},
        {"brown_dwarf_teff_min_k", s.brown_dwarf_teff_min_k},
        {"brown_dwarf_teff_max_k", s.brown_dwarf_teff_max_k},
        {"ifmr_slope", s.ifmr_slope},
        {"ifmr_intercept_msun", s.ifmr_intercept_msun},
        {"hydrogen_atmosphere_share", s.hydrogen_atmosphere_share},
        {"binary_fraction", s.binary_fraction},
        {"wide_companion_fraction", s.wide_companion_fraction},
        {"wide_triple_share", s.wide_triple_share},
        {"wide_log_period_mean_day", s.wide_log_period_mean_day},
        {"wide_log_period_sigma_dex", s.wide_log_period_sigma_dex},
        {"resolution_limit_arcsec", s.resolution_limit_arcsec},
        {"wide_max_separation_au", s.wide_max_separation_au},
        {"ms_abs_mag_scatter_mag", s.ms_abs_mag_scatter_mag},
        {"ms_colour_scatter_mag", s.ms_colour_scatter_mag},
        {"giant_abs_g_scatter_mag", s.giant_abs_g_scatter_mag},
        {"giant_bp_rp_mag", s.giant_bp_rp_mag},
        {"giant_bp_rp_scatter_mag", s.giant_bp_rp_scatter_mag},
        {"giant_g_ks_mag", s.giant_g_ks_mag},
        {"giant_g_ks_scatter_mag", s.giant_g_ks_scatter_mag},
        {"g_limit_mag", s.g_limit_mag},
        {"g_bright_limit_mag", s.g_bright_limit_mag},
        {"bp_rp_loss_start_g_mag", s.bp_rp_loss_start_g_mag},
        {"bp_rp_loss_end_g_mag", s.bp_rp_loss_end_g_mag},
        {"j_limit_mag", s.j_limit_mag},
        {"h_limit_mag", s.h_limit_mag},
        {"ks_limit_mag", s.ks_limit_mag},
        {"ruwe_scatter_dex", s.ruwe_scatter_dex},
        {"binary_high_ruwe_share", s.binary_high_ruwe_share},
        {"binary_high_ruwe_min", s.binary_high_ruwe_min},
        {"binary_high_ruwe_max", s.binary_high_ruwe_max},
    };
}

namespace {

nlohmann::json companionSettingsJson(const CompanionSettings& c) {
    return {
        {"epoch_yr", c.epoch_yr},
        {"ultracool_min_code", c.ultracool_min_code},
        {"w1_limit_mag", c.w1_limit_mag},
        {"w2_limit_mag", c.w2_limit_mag},
        {"followup_j_limit_mag", c.followup_j_limit_mag},
        {"followup_h_limit_mag", c.followup_h_limit_mag},
        {"followup_ks_limit_mag", c.followup_ks_limit_mag},
        {"ultracool_parallax_error_mas", c.ultracool_parallax_error_mas},
        {"ultracool_position_error_arcsec", c.ultracool_position_error_arcsec},
        {"spectral_type_share", c.spectral_type_share},
        {"hipparcos_parallax_error_mas", c.hipparcos_parallax_error_mas},
        {"hipparcos_pm_error_mas_per_yr", c.hipparcos_pm_error_mas_per_yr},
        {"johnson_error_mag", c.johnson_error_mag},
        {"two_mass_saturation_mag", c.two_mass_saturation_mag},
        {"bright_two_mass_error_mag", c.bright_two_mass_error_mag},
    };
}

} // namespace

nlohmann::json mockTruthJson(const MockResult& result, std::span<const double> radii_pc) {
    const bool with_companion = result.settings.companion.enabled;
    nlohmann::json objects = nlohmann::json::array();
    for (const ObjectTruth& t : result.truth) {
        objects.push_back({
            {"source_id", t.source_id},
            {"class", photometry::className(t.true_class)},
            {"stage", kMockStageNames[static_cast<std::size_t>(t.stage)]},
            {"spectral_code", number(t.spectral_code)},
            {"spectral_type", std::isnan(t.spectral_code)
                                  ? nlohmann::json(nullptr)
                                  : nlohmann::json(photometry::spectralTypeLabel(t.spectral_code))},
            {"distance_pc", t.distance_pc},
            {"mass_msun", number(t.mass_msun)},
            {"initial_mass_msun", number(t.initial_mass_msun)},
            {"age_gyr", t.age_gyr},
            {"binary", t.binary},
            {"companion_class",
             t.binary ? nlohmann::json(photometry::className(t.companion_class)) : nlohmann::json(nullptr)},
            {"companion_mass_msun", number(t.companion_mass_msun)},
            {"system_source_id", t.system_source_id},
            {"resolved_companion", t.resolved_companion},
            {"separation_au", t.separation_au},
            {"separation_arcsec", t.separation_arcsec},
            {"abs_g_mag", number(t.abs_g_mag)},
            {"true_g_mag", number(t.true_g_mag)},
            {"catalogued", t.catalogued},
        });
        if (with_companion) {
            nlohmann::json files = nlohmann::json::array();
            if (t.catalogued) {
                files.push_back("gaia");
            }
            if (t.in_companion) {
                files.push_back("companion");
            }
            objects.back()["files"] = std::move(files);
            objects.back()["companion_row"] =
                t.in_companion ? nlohmann::json(t.companion_row) : nlohmann::json(nullptr);
        }
    }
    nlohmann::json truth = {
        {"description", "truth of a SIMULATED starcensus mock (not observations)"},
        {"seed", result.seed},
        {"settings", mockSettingsJson(result.settings)},
        {"objects_total", result.truth.size()},
        {"catalogued_total", result.catalog.size()},
        {"remnant_only_systems", result.remnant_only_systems},
        {"counts_within_radius", countsJson(countWithinRadii(result.truth, radii_pc), with_companion)},
        {"objects", std::move(objects)},
    };
    if (with_companion) {
        truth["companion_settings"] = companionSettingsJson(result.settings.companion);
        truth["companion_total"] = result.companion_catalog.size();
    }
    return truth;
}

void writeMockTruth(const std::filesystem::path& path, const MockResult& result,
                    std::span<const double> radii_pc) {
    writeTextFileAtomically(path, mockTruthJson(result, radii_pc).dump(1) + "\n");
}

MockStreamSummary streamMockCatalog(const std::filesystem::path& path, const MockSettings& settings,
                                    std::uint64_t seed, std::span<const double> radii_pc,
                                    std::size_t chunk_systems) {
    MockGenerator generator(settings, seed, photometry::shippedModelPhotometry());
    MockCatalogWriter writer(path, settings, seed);
    MockStreamSummary summary;
    summary.counts = countWithinRadii({}, radii_pc);
    std::vector<CatalogRow> catalog;
    std::vector<ObjectTruth> truth;
    bool more = true;
    while (more) {
        catalog.clear();
        truth.clear();
        more = generator.next(chunk_systems, catalog, truth);
        writer.append(catalog);
        addToCounts(truth, summary.counts);
        summary.objects += static_cast<std::int64_t>(truth.size());
        summary.catalogued += static_cast<std::int64_t>(catalog.size());
    }
    writer.finish();
    summary.remnant_only_systems = generator.remnantOnlySystems();
    return summary;
}

} // namespace starcensus::census::mock
