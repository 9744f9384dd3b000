#include "reports/LuminosityOutput.h"

#include "reports/SampleOutput.h"

#include "census/MockPhotometry.h"
#include "photometry/AtomicOutput.h"
#include "reports/FractionsOutput.h"

#include <cmath>
#include <iomanip>
#include <limits>
#include <sstream>

namespace starcensus::reports {

namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

struct ClassifiedRow {
    double abs_g_mag;
    double distance_pc;
    photometry::Category category;
};

std::vector<ClassifiedRow> classifyRows(std::span<const photometry::CatalogRow> rows,
                                        const photometry::Classifier& classifier,
                                        const census::CensusSettings& census) {
    std::vector<ClassifiedRow> classified;
    const double zero_point = census.membership.parallax_zero_point_mas;
    for (const auto& row : rows) {
        const double parallax_mas = row.parallax_mas - zero_point;
        const photometry::Classification result =
            classifyRow(row, classifier, census.membership, census.quality.min_parallax_snr_to_classify);
        classified.push_back({result.abs_g_mag, parallax_mas > 0.0 ? 1000.0 / parallax_mas : kInfinity,
                              photometry::categoryOf(result.stellar_class, result.spectral_code)});
    }
    return classified;
}

std::vector<census::SampleStar> starsWithin(const std::vector<ClassifiedRow>& classified,
                                            const census::PreparedSample& sample, std::size_t r) {
    std::vector<census::SampleStar> stars;
    for (std::size_t s = 0; s < classified.size(); ++s) {
        const ClassifiedRow& row = classified[s];
        const double weight = sample.probabilityWithin(s, r);
        if (std::isfinite(row.abs_g_mag) && std::isfinite(row.distance_pc) && weight > 0.0) {
            stars.push_back({row.abs_g_mag, row.distance_pc, weight, row.category});
        }
    }
    return stars;
}

nlohmann::json namedValues(const std::vector<std::string>& names, const std::vector<double>& values) {
    nlohmann::json object = nlohmann::json::object();
    for (std::size_t k = 0; k < names.size() && k < values.size(); ++k) {
        object[names[k]] = values[k];
    }
    return object;
}

} // namespace

LuminosityAnalysis analyseLuminosity(std::span<const photometry::CatalogRow> rows,
                                     const census::PreparedSample& sample, const census::DrawTallies& tallies,
                                     const photometry::Classifier& classifier,
                                     const census::CensusSettings& census,
                                     const census::LuminosityRunSettings& settings) {
    LuminosityAnalysis analysis;
    const census::CompletenessSettings& completeness = settings.completeness;
    analysis.limits = {completeness.faint_limit_g_mag, completeness.bright_limit_g_mag};
    analysis.faint_limit_source = "default";
    if (completeness.estimate_faint_limit) {
        std::vector<double> g_mag;
        for (const auto& row : rows) {
            g_mag.push_back(row.g_mag);
        }
        const double estimated = census::estimateFaintLimitMag(g_mag, completeness);
        if (std::isfinite(estimated)) {
            analysis.limits.faint_g_mag = estimated;
            analysis.faint_limit_source = "estimated";
        }
    }
    const census::MockPhotometry& photometry = census::shippedMockPhotometry();
    const auto ranges = census::categoryAbsGRanges(photometry, completeness);
    const std::vector<ClassifiedRow> classified = classifyRows(rows, classifier, census);
    const std::vector<double>& radii = census.radii_pc;
    std::vector<census::SampleStar> stars;
    for (std::size_t r = 0; r < radii.size(); ++r) {
        stars = starsWithin(classified, sample, r);
        analysis.completeness.push_back(census::assessCompleteness(stars, radii[r], census.groups,
                                                                   analysis.limits, ranges, completeness));
    }
    // The luminosity function and its fits at the largest radius (`stars` holds its weights).
    analysis.lf_radius_pc = radii.back();
    analysis.complete_abs_g_mag =
        census::completeAbsGRange(radii.back(), analysis.limits, completeness.bright_hole_volume_tolerance);
    analysis.table = census::estimateLuminosityFunction(
        stars, radii.back(), analysis.limits, completeness.bright_hole_volume_tolerance, settings.luminosity);
    analysis.model_phi.assign(analysis.table.size(), std::numeric_limits<double>::quiet_NaN());
    if (settings.fit_models.empty()) {
        return analysis; // --lf-fit none: the luminosity function without a model or a correction
    }
    const census::LuminosityModel model(settings.fit.start.mass_min_msun, settings.fit.start.mass_max_msun,
                                        settings.model, photometry);
    for (const census::ImfFamily family : settings.fit_models) {
        census::MassFunctionFitSettings fit_settings = settings.fit;
        fit_settings.family = family;
        analysis.fits.push_back(
            census::fitMassFunction(analysis.table, model, radii.back(), analysis.limits, fit_settings));
        const auto& fit = analysis.fits.back();
        if (fit.converged && (!analysis.correction_fit ||
                              fit.log_likelihood > analysis.fits[*analysis.correction_fit].log_likelihood)) {
            analysis.correction_fit = analysis.fits.size() - 1;
        }
    }
    if (analysis.correction_fit) {
        const auto& fit = analysis.fits[*analysis.correction_fit];
        std::vector<std::array<double, 2>> bins;
        for (const auto& bin : analysis.table) {
            bins.push_back({bin.abs_g_lo_mag, bin.abs_g_hi_mag});
        }
        const std::vector<double> phi = census::modelPhi(fit, model, bins);
        for (std::size_t b = 0; b < bins.size(); ++b) {
            if (analysis.table[b].population == census::LfPopulation::MainSequence) {
                analysis.model_phi[b] = phi[b];
            }
        }
        // Only the faint limit is filled in: stars brighter than the bright limit are usually in the
        // input anyway (see README, Methods), and the census counts every member.
        analysis.corrected = census::correctForCompleteness(tallies, radii, census.groups, model, fit,
                                                            {analysis.limits.faint_g_mag, -kInfinity},
                                                            census.draws.seed, census.draws.threads);
    }
    return analysis;
}

nlohmann::json completenessJson(const LuminosityAnalysis& analysis) {
    nlohmann::json radii = nlohmann::json::array();
    for (std::size_t r = 0; r < analysis.completeness.size(); ++r) {
        const census::RadiusCompleteness& radius = analysis.completeness[r];
        nlohmann::json classes = nlohmann::json::object();
        for (std::size_t g = 0; g < radius.groups.size(); ++g) {
            const census::GroupCompleteness& group = radius.groups[g];
            classes[group.name] = {
                {"v_over_vmax", group.v_over_vmax.mean},
                {"v_over_vmax_expected", group.v_over_vmax.expected},
                {"v_over_vmax_sigma", group.v_over_vmax.sigma},
                {"n_effective", group.v_over_vmax.n_effective},
                {"completeness_radius_pc", group.completeness_radius_pc},
                {"complete", group.complete},
                {"outside_complete_range", group.outside_range},
                {"subtypes_outside", group.subtypes_outside},
                {"model_completeness", analysis.corrected.empty()
                                           ? nlohmann::json(nullptr)
                                           : nlohmann::json(analysis.corrected[r].groups[g].completeness)}};
        }
        radii.push_back({{"radius_pc", radius.radius_pc},
                         {"complete_abs_g_range", radius.complete_abs_g_mag},
                         {"classes", classes}});
    }
    return {{"schema", kCompletenessSchema},
            {"faint_limit_g", analysis.limits.faint_g_mag},
            {"bright_limit_g", analysis.limits.bright_g_mag},
            {"faint_limit_source", analysis.faint_limit_source},
            {"radii", radii}};
}

nlohmann::json lumfuncFitJson(const LuminosityAnalysis& analysis) {
    nlohmann::json fits = nlohmann::json::array();
    for (const auto& fit : analysis.fits) {
        fits.push_back({{"model", census::fitModelName(fit.family)},
                        {"converged", fit.converged},
                        {"iterations", fit.iterations},
                        {"message", fit.message},
                        {"parameters", namedValues(fit.names, fit.values)},
                        {"errors", namedValues(fit.names, fit.errors)},
                        {"covariance", fit.covariance},
                        {"log_likelihood", fit.log_likelihood},
                        {"goodness_of_fit",
                         {{"statistic", "cash"},
                          {"cash_statistic", fit.deviance},
                          {"degrees_of_freedom", fit.degrees_of_freedom},
                          {"p_value", fit.p_value},
                          {"bins", fit.bins_used},
                          {"fit_abs_g_range", fit.fit_abs_g_mag}}}});
    }
    return {{"schema", kLumfuncFitSchema},
            {"radius_pc", analysis.lf_radius_pc},
            {"fits", fits},
            {"correction_model",
             analysis.correction_fit
                 ? nlohmann::json(census::fitModelName(analysis.fits[*analysis.correction_fit].family))
                 : nlohmann::json(nullptr)},
            {"complete_abs_g_range", analysis.complete_abs_g_mag}};
}

std::string lumfuncCsv(const LuminosityAnalysis& analysis) {
    std::ostringstream csv;
    csv << std::setprecision(8)
        << "population,abs_g_lo,abs_g_hi,n_weighted,phi_per_pc3_per_mag,phi_lo68,phi_hi68,"
           "model_phi_per_pc3_per_mag\n";
    for (std::size_t b = 0; b < analysis.table.size(); ++b) {
        const census::LfBin& bin = analysis.table[b];
        csv << census::kLfPopulationNames[static_cast<std::size_t>(bin.population)] << ',' << bin.abs_g_lo_mag
            << ',' << bin.abs_g_hi_mag << ',' << bin.n_weighted << ',' << bin.phi_per_pc3_per_mag << ','
            << bin.phi_lo68 << ',' << bin.phi_hi68 << ',';
        if (std::isfinite(analysis.model_phi[b])) {
            csv << analysis.model_phi[b];
        }
        csv << '\n';
    }
    return csv.str();
}

void addCompletenessToFractions(nlohmann::json& fractions, const LuminosityAnalysis& analysis) {
    auto& radii = fractions["radii"];
    for (std::size_t r = 0; r < radii.size(); ++r) {
        for (auto& [name, entry] : radii[r]["classes"].items()) {
            entry["completeness"] = nullptr;
            entry["corrected"] = nullptr;
            if (analysis.corrected.empty()) {
                continue;
            }
            for (const census::CorrectedGroup& group : analysis.corrected[r].groups) {
                if (group.name == name) {
                    entry["completeness"] = group.completeness;
                    entry["corrected"] = {{"fraction", intervalJson(group.fraction)},
                                          {"count", intervalJson(group.count)},
                                          {"missing", intervalJson(group.missing)}};
                }
            }
        }
    }
}

void writeLuminosityOutputs(const std::filesystem::path& directory, const LuminosityAnalysis& analysis) {
    writeJsonFile(directory / "completeness.json", completenessJson(analysis));
    writeTextFileAtomically(directory / "lumfunc.csv", lumfuncCsv(analysis));
    writeJsonFile(directory / "lumfunc_fit.json", lumfuncFitJson(analysis));
}

} // namespace starcensus::reports
