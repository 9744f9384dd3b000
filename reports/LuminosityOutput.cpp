#include "reports/LuminosityOutput.h"

#include "photometry/base/AtomicOutput.h"
#include "reports/FractionsOutput.h"

#include <cmath>
#include <iomanip>
#include <limits>
#include <sstream>

namespace starcensus::reports {

namespace {

nlohmann::json namedValues(const std::vector<std::string>& names, const std::vector<double>& values) {
    nlohmann::json object = nlohmann::json::object();
    for (std::size_t k = 0; k < names.size() && k < values.size(); ++k) {
        object[names[k]] = values[k];
    }
    return object;
}

} // namespace

nlohmann::json completenessJson(const census::LuminosityAnalysis& analysis) {
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

nlohmann::json lumfuncFitJson(const census::LuminosityAnalysis& analysis) {
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

std::string lumfuncCsv(const census::LuminosityAnalysis& analysis) {
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

void addCompletenessToFractions(nlohmann::json& fractions, const census::LuminosityAnalysis& analysis) {
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

void writeLuminosityOutputs(const std::filesystem::path& directory,
                            const census::LuminosityAnalysis& analysis) {
    writeJsonFile(directory / "completeness.json", completenessJson(analysis));
    writeTextFileAtomically(directory / "lumfunc.csv", lumfuncCsv(analysis));
    writeJsonFile(directory / "lumfunc_fit.json", lumfuncFitJson(analysis));
}

} // namespace starcensus::reports
