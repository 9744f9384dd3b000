#include "reports/SampleOutput.h"

#include "reports/SystemsOutput.h"

#include "photometry/catalog/FitsTableWriter.h"

#include <cmath>
#include <cstdio>
#include <string>

namespace starcensus::reports {

namespace {

using photometry::FitsColumn;
using photometry::FitsColumnType;

std::vector<FitsColumn> sampleColumns(const std::vector<double>& radii_pc,
                                      const census::SystemCatalog* systems) {
    std::vector<FitsColumn> columns = rowIdentityColumns();
    columns.insert(
        columns.end(),
        {
            {"g", FitsColumnType::Float32, "mag", "phot.mag;em.opt", "Gaia G", 0, {}},
            {"bp",
             FitsColumnType::Float32,
             "mag",
             "phot.mag;em.opt.B",
             "Gaia BP (NaN if dropped by a cut)",
             0,
             {}},
            {"rp",
             FitsColumnType::Float32,
             "mag",
             "phot.mag;em.opt.R",
             "Gaia RP (NaN if dropped by a cut)",
             0,
             {}},
            {"abs_g", FitsColumnType::Float32, "mag", "phys.magAbs;em.opt", "M_G from the parallax", 0, {}},
            {"abs_g_error",
             FitsColumnType::Float32,
             "mag",
             "stat.error;phys.magAbs",
             "first-order M_G error",
             0,
             {}},
            {"bp_rp", FitsColumnType::Float32, "mag", "phot.color;em.opt.B;em.opt.R", "BP-RP", 0, {}},
            {"g_rp", FitsColumnType::Float32, "mag", "phot.color;em.opt;em.opt.R", "G-RP", 0, {}},
            {"class", FitsColumnType::String, "", "src.class", "class from the exact classifier", 12, {}},
            {"spectral_type", FitsColumnType::String, "", "src.spType", "dwarf-equivalent subtype", 8, {}},
            {"spectral_code",
             FitsColumnType::Float32,
             "",
             "src.spType",
             "numeric subtype: O0=0 B0=10 A0=20 F0=30 G0=40 K0=50 M0=60 L0=70 T0=80 Y0=90",
             0,
             {}},
            {"teff",
             FitsColumnType::Float32,
             "K",
             "phys.temperature.effective",
             "Teff of the locus at the subtype",
             0,
             {}},
            {"mass",
             FitsColumnType::Float32,
             "solMass",
             "phys.mass",
             "mass of the locus at the subtype",
             0,
             {}},
            {"locus_offset",
             FitsColumnType::Float32,
             "mag",
             "phot.mag;arith.diff",
             "M_G minus the main-sequence locus M_G at the colour",
             0,
             {}},
            {"match_chi2",
             FitsColumnType::Float32,
             "",
             "stat.fit.chi2",
             "chi^2 of the best match over bands (flag 1024); NaN where the colour path classified",
             0,
             {}},
            {"spectral_code_low",
             FitsColumnType::Float32,
             "",
             "src.spType;stat.min",
             "lowest code with chi^2 <= minimum + 1 (flag 1024; unrounded grid)",
             0,
             {}},
            {"spectral_code_high",
             FitsColumnType::Float32,
             "",
             "src.spType;stat.max",
             "highest code with chi^2 <= minimum + 1 (flag 1024; unrounded grid)",
             0,
             {}},
            {"flags", FitsColumnType::Int32, "", "meta.code.qual", "classification flags (README)", 0, {}},
            {"unclassified_reason",
             FitsColumnType::String,
             "",
             "meta.code",
             "why class is unclassified: outside_loci, no_photometry, low_parallax_snr; empty otherwise",
             16,
             {}},
            {"photometric_class",
             FitsColumnType::String,
             "",
             "src.class",
             "class from the photometry alone (differs from class where a literature type is used)",
             12,
             {}},
            {"literature_class",
             FitsColumnType::String,
             "",
             "src.class",
             "class of the catalogue's spectral type; empty without one (or with --spectral-types ignore)",
             12,
             {}},
        });
    for (const double radius : radii_pc) {
        columns.push_back({"p_within_" + radiusLabel(radius) + "pc",
                           FitsColumnType::Float32,
                           "",
                           "stat.probability",
                           "probability that the true distance is within the radius",
                           0,
                           {}});
    }
    for (const auto name : photometry::kClassNames) {
        columns.push_back({"prob_" + std::string(name),
                           FitsColumnType::Float32,
                           "",
                           "stat.probability",
                           "share of Monte Carlo draws with this class",
                           0,
                           {}});
    }
    appendSystemMembershipColumns(columns, systems);
    return columns;
}

} // namespace

std::string radiusLabel(double radius_pc) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%g", radius_pc);
    std::string label = buffer;
    for (char& c : label) {
        c = c == '.' ? 'p' : c;
    }
    return label;
}

std::vector<photometry::FitsColumn> rowIdentityColumns() {
    return {
        {"source_id", FitsColumnType::Int64, "", "meta.id;meta.main", "source identifier from the input", 0,
         -1},
        {"file_index", FitsColumnType::Int32, "", "meta.id", "0-based index of the input file", 0, {}},
        {"row_index", FitsColumnType::Int64, "", "meta.record", "0-based row in the input table", 0, {}},
        {"ra", FitsColumnType::Float64, "deg", "pos.eq.ra;meta.main", "right ascension", 0, {}},
        {"dec", FitsColumnType::Float64, "deg", "pos.eq.dec;meta.main", "declination", 0, {}},
        {"parallax", FitsColumnType::Float64, "mas", "pos.parallax.trig", "catalogue parallax", 0, {}},
        {"parallax_error",
         FitsColumnType::Float32,
         "mas",
         "stat.error;pos.parallax.trig",
         "parallax error",
         0,
         {}},
    };
}

void appendRowIdentity(photometry::FitsRowBlock& block, std::size_t& column,
                       const photometry::CatalogRow& row) {
    block.values<std::int64_t>(column++).push_back(
        row.source_id == photometry::kMissingSourceId ? -1 : row.source_id);
    block.values<std::int32_t>(column++).push_back(static_cast<std::int32_t>(row.file_index));
    block.values<std::int64_t>(column++).push_back(row.row_index);
    for (const double value : {row.ra_deg, row.dec_deg, row.parallax_mas}) {
        block.values<double>(column++).push_back(value);
    }
    block.values<float>(column++).push_back(static_cast<float>(row.parallax_error_mas));
}

std::string spectralTypeColumn(const photometry::Classification& result) {
    const bool dwarf = result.stellar_class < photometry::StellarClass::WhiteDwarf;
    return dwarf && std::isfinite(result.spectral_code) ? photometry::spectralTypeLabel(result.spectral_code)
                                                        : std::string();
}

void writeSampleTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                      const census::PreparedSample& sample, const census::DrawTallies& tallies,
                      const photometry::Classifier& classifier, const census::RowClassRules& rules,
                      const census::SystemCatalog* systems) {
    photometry::FitsTableWriter writer(
        path, "SAMPLE", sampleColumns(sample.radii(), systems),
        {{"ORIGIN", std::string("starcensus"), "software that wrote this file"}});
    auto block = writer.makeBlock();
    const std::size_t radii = sample.radii().size();
    for (std::size_t s = 0; s < rows.size(); ++s) {
        const auto& row = rows[s];
        const photometry::Classification photometric = census::classifyRowPhotometry(row, classifier, rules);
        const photometry::Classification result =
            census::applySpectralTypePolicy(photometric, row, classifier, rules);
        std::size_t c = 0;
        appendRowIdentity(block, c, row);
        for (const double value :
             std::initializer_list<double>{row.g_mag, row.bp_mag, row.rp_mag, result.abs_g_mag,
                                           result.abs_g_error_mag, result.bp_rp_mag, result.g_rp_mag}) {
            block.values<float>(c++).push_back(static_cast<float>(value));
        }
        block.values<std::string>(c++).push_back(std::string(photometry::className(result.stellar_class)));
        block.values<std::string>(c++).push_back(spectralTypeColumn(result));
        for (const double value :
             {result.spectral_code, result.teff_k, result.mass_msun, result.locus_offset_mag,
              result.match_chi_squared, result.code_low, result.code_high}) {
            block.values<float>(c++).push_back(static_cast<float>(value));
        }
        block.values<std::int32_t>(c++).push_back(result.flags);
        const auto reason = photometry::reasonOfCategory(photometry::censusCategory(result));
        block.values<std::string>(c++).push_back(reason ? std::string(photometry::reasonName(*reason)) : "");
        block.values<std::string>(c++).push_back(
            std::string(photometry::className(photometric.stellar_class)));
        block.values<std::string>(c++).push_back(
            census::readsLiteratureType(row, rules) ? std::string(photometry::className(row.literature_class))
                                                    : std::string());
        for (std::size_t r = 0; r < radii; ++r) {
            block.values<float>(c++).push_back(sample.probabilityWithin(s, r));
        }
        for (std::size_t k = 0; k < photometry::kClassCount; ++k) {
            block.values<float>(c++).push_back(
                static_cast<float>(tallies.star_classes.draws(s, static_cast<photometry::StellarClass>(k))) /
                static_cast<float>(tallies.draws));
        }
        appendSystemMembership(block, c, systems, s);
        writer.appendIfFull(block, s + 1);
    }
    writer.append(block);
    writer.finish();
}

} // namespace starcensus::reports
