#pragma once
// Completeness, the luminosity function, its mass-function fits and the corrected fractions of one run:
// the rows classified as sample.fits has them (RowClassification.h), weighted by their membership
// probabilities, through Completeness.h, LuminosityFunction.h, MassFunctionFit.h and
// CompletenessCorrection.h. The files they go to are written by reports/LuminosityOutput.h.
#include "census/CensusOptions.h"
#include "census/CompletenessCorrection.h"
#include "census/LuminosityOptions.h"
#include "census/MonteCarlo.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"

#include <array>
#include <optional>
#include <span>
#include <string>
#include <vector>

namespace starcensus::census {

struct LuminosityAnalysis {
    MagnitudeLimits limits;
    std::string faint_limit_source;               // "default" or "estimated"
    std::vector<RadiusCompleteness> completeness; // per census radius
    double lf_radius_pc = 0.0;                    // the luminosity function is that of the largest radius
    std::array<double, 2> complete_abs_g_mag{};   // at lf_radius_pc
    std::vector<LfBin> table;
    std::vector<double> model_phi; // per bin of `table`, NaN where there is no model
    std::vector<MassFunctionFitResult> fits;
    std::optional<std::size_t> correction_fit; // the converged fit of highest likelihood
    std::vector<CorrectedRadius> corrected;    // empty without a converged fit
};

/// Classifies the rows (as sample.fits does), weights them by membership, and runs the completeness
/// tests per radius, the luminosity function and fits at the largest radius, and the correction.
LuminosityAnalysis analyseLuminosity(std::span<const photometry::CatalogRow> rows,
                                     const PreparedSample& sample, const DrawTallies& tallies,
                                     const photometry::Classifier& classifier, const CensusSettings& census,
                                     const LuminosityRunSettings& settings);

} // namespace starcensus::census
