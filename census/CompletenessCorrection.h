#pragma once
// Fractions corrected for what the survey cannot see. For every census category the fitted luminosity
// model (MassFunctionFit.h) predicts how many systems inside R lie beyond the faint limit:
// missing_k = n * sum over the category's model elements of share * weight * (V(R) - V_eff(M_G)).
// In each Monte Carlo draw the parameters are drawn from the fit's Gaussian covariance, the missing
// numbers from Poisson laws with those means, and they are added to the draw's observed counts; the
// corrected fractions are those of the corrected counts. So the intervals carry the measurement noise
// (draws), the fit uncertainty and the Poisson scatter of the unseen objects. Categories the model does
// not describe (white dwarfs, evolved, unclassified) get no correction. Members of a merged input that
// another catalogue found beyond the limits are already counted: their expected number is taken off the
// mean unseen number of their category (MembersBeyondLimits).
#include "census/ClassGroups.h"
#include "census/Intervals.h"
#include "census/MassFunctionFit.h"
#include "census/MonteCarlo.h"

#include <array>
#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::census {

struct CorrectedGroup {
    std::string name;
    double completeness = 0.0; // model share of the group's systems inside R that are seen (best fit);
                               // NaN where the model predicts none of the group
    bool corrected = false;    // the model predicts unseen members
    IntervalSummary missing;   // predicted unseen members
    IntervalSummary count;     // observed + missing
    IntervalSummary fraction;  // corrected count / corrected total
};

struct CorrectedRadius {
    double radius_pc = 0.0;
    IntervalSummary total; // corrected number of members
    std::vector<CorrectedGroup> groups;
};

/// Per radius and census category: members the input holds although the limits hide them from the
/// G survey (rows without G, or fainter than the faint limit; the sum of their membership probabilities).
/// Another catalogue of a merged input found them, so they are already among the observed counts.
using MembersBeyondLimits = std::vector<std::array<double, photometry::kCategoryCount>>;

/// Empty when the fit did not converge. `limits` are the limits the correction fills in (the pipeline
/// passes only the faint one: see README, Methods). `threads`: 0 = one per hardware thread; the result
/// does not depend on it. `beyond_limits` (empty, or one entry per radius): each category's mean unseen
/// number is reduced by its members beyond the limits, down to 0, so a merged input's ultracool dwarfs
/// found by WISE are not added a second time.
std::vector<CorrectedRadius>
correctForCompleteness(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                       const std::vector<ClassGroup>& groups, const LuminosityModel& model,
                       const MassFunctionFitResult& fit, const MagnitudeLimits& limits, std::uint64_t seed,
                       unsigned threads = 1, const MembersBeyondLimits& beyond_limits = {});

} // namespace starcensus::census
