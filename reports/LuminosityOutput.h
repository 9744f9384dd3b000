#pragma once
// Completeness, the luminosity function, its mass-function fits and the corrected fractions of one run,
// and the files they go to: completeness.json (schema "starcensus.completeness/1"), lumfunc.csv and
// lumfunc_fit.json (schema "starcensus.lumfunc_fit/1"); fractions.json gains per class a `completeness`
// and a `corrected` block. The layouts are documented in README.md (Outputs).
#include "census/CensusOptions.h"
#include "census/CompletenessCorrection.h"
#include "census/LuminosityOptions.h"
#include "census/MonteCarlo.h"
#include "photometry/CatalogRow.h"
#include "photometry/Classifier.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <optional>
#include <span>
#include <string>
#include <vector>

namespace starcensus::reports {

inline constexpr const char* kCompletenessSchema = "starcensus.completeness/1";
inline constexpr const char* kLumfuncFitSchema = "starcensus.lumfunc_fit/1";

struct LuminosityAnalysis {
    census::MagnitudeLimits limits;
    std::string faint_limit_source;                       // "default" or "estimated"
    std::vector<census::RadiusCompleteness> completeness; // per census radius
    double lf_radius_pc = 0.0;                  // the luminosity function is that of the largest radius
    std::array<double, 2> complete_abs_g_mag{}; // at lf_radius_pc
    std::vector<census::LfBin> table;
    std::vector<double> model_phi; // per bin of `table`, NaN where there is no model
    std::vector<census::MassFunctionFitResult> fits;
    std::optional<std::size_t> correction_fit;      // the converged fit of highest likelihood
    std::vector<census::CorrectedRadius> corrected; // empty without a converged fit
};

/// Classifies the rows (as sample.fits does), weights them by membership, and runs the completeness
/// tests per radius, the luminosity function and fits at the largest radius, and the correction.
LuminosityAnalysis analyseLuminosity(std::span<const photometry::CatalogRow> rows,
                                     const census::PreparedSample& sample, const census::DrawTallies& tallies,
                                     const photometry::Classifier& classifier,
                                     const census::CensusSettings& census,
                                     const census::LuminosityRunSettings& settings);

nlohmann::json completenessJson(const LuminosityAnalysis& analysis);
nlohmann::json lumfuncFitJson(const LuminosityAnalysis& analysis);
std::string lumfuncCsv(const LuminosityAnalysis& analysis);

/// Adds `completeness` (model share seen, null without a fit) and `corrected` ({count, fraction,
/// missing} intervals, null without a fit) to every class of every radius of a fractions.json document.
void addCompletenessToFractions(nlohmann::json& fractions, const LuminosityAnalysis& analysis);

/// Writes completeness.json, lumfunc.csv and lumfunc_fit.json into `directory` (atomically).
void writeLuminosityOutputs(const std::filesystem::path& directory, const LuminosityAnalysis& analysis);

} // namespace starcensus::reports
