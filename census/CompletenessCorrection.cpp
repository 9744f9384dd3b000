#include "census/CompletenessCorrection.h"

#include "census/Fractions.h"
#include "census/Random.h"
#include "photometry/base/Threads.h"

#include <Eigen/Dense>

#include <array>
#include <cmath>
#include <limits>
#include <map>
#include <random>

namespace starcensus::census {

namespace {

// Streams of the parameter and Poisson deviates, far from the Monte Carlo's per-star streams.
constexpr std::uint64_t kCorrectionStreamBase = 0xc0de000000000000ULL;
constexpr int kMaxParameterTries = 100;

using PerCategory = std::array<double, photometry::kCategoryCount>;

/// One mass cell's contribution to a category's unseen systems: per unit density and per unit IMF share
/// of the cell, the systems inside R that lie beyond the limits (pc^3 x element weight).
struct UnseenTerm {
    std::uint32_t cell;
    photometry::Category category;
    double volume_pc3;
};

/// The unseen terms at one radius, merged per (cell, category) and without the elements that are seen
/// everywhere inside R. They do not depend on the mass-function parameters, so the per-draw work is one
/// multiply-add per term instead of one per model element (60 age cells per brown-dwarf mass cell).
std::vector<UnseenTerm> unseenTerms(const LuminosityModel& model, double radius_pc,
                                    const MagnitudeLimits& limits) {
    const double volume = sphereVolumePc3(radius_pc);
    std::map<std::pair<std::uint32_t, photometry::Category>, double> merged;
    for (const LuminosityModel::Element& element : model.elements()) {
        const double unseen = volume - effectiveVolumePc3(element.abs_g_mag, radius_pc, limits);
        if (unseen > 0.0) {
            merged[{element.cell, element.category}] += element.weight * unseen;
        }
    }
    std::vector<UnseenTerm> terms;
    for (const auto& [key, volume_pc3] : merged) {
        terms.push_back({key.first, key.second, volume_pc3});
    }
    return terms;
}

/// Expected unseen systems per category inside R, per unit density, for one set of mass-cell shares.
PerCategory unseenCounts(const std::vector<UnseenTerm>& terms, const std::vector<double>& shares) {
    PerCategory unseen{};
    for (const UnseenTerm& term : terms) {
        unseen[term.category] += shares[term.cell] * term.volume_pc3;
    }
    return unseen;
}

/// Expected systems per category inside R (seen or not), per unit density.
PerCategory allCounts(const LuminosityModel& model, const std::vector<double>& shares, double volume_pc3) {
    PerCategory all{};
    for (const LuminosityModel::Element& element : model.elements()) {
        all[element.category] += shares[element.cell] * element.weight * volume_pc3;
    }
    return all;
}

// Parameters drawn from N(values, covariance), redrawn while outside the fit's box (the best fit itself
// after too many tries).
std::vector<double> drawParameters(const MassFunctionFitResult& fit, const Eigen::MatrixXd& cholesky_factor,
                                   Xoshiro256& random) {
    const auto n = static_cast<Eigen::Index>(fit.values.size());
    const Eigen::Map<const Eigen::VectorXd> best(fit.values.data(), n);
    for (int attempt = 0; attempt < kMaxParameterTries; ++attempt) {
        Eigen::VectorXd z(n);
        for (Eigen::Index k = 0; k < n; ++k) {
            z[k] = random.normal();
        }
        const Eigen::VectorXd theta = best + cholesky_factor * z;
        if (parametersValid(fit.family, {theta.data(), fit.values.size()})) {
            return {theta.data(), theta.data() + n};
        }
    }
    return fit.values;
}

} // namespace

std::vector<CorrectedRadius>
correctForCompleteness(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                       const std::vector<ClassGroup>& groups, const LuminosityModel& model,
                       const MassFunctionFitResult& fit, const MagnitudeLimits& limits, std::uint64_t seed,
                       unsigned threads, const MembersBeyondLimits& beyond_limits) {
    if (!fit.converged) {
        return {};
    }
    const auto n = static_cast<Eigen::Index>(fit.values.size());
    Eigen::MatrixXd covariance(n, n);
    for (Eigen::Index a = 0; a < n; ++a) {
        for (Eigen::Index b = 0; b < n; ++b) {
            covariance(a, b) = fit.covariance[static_cast<std::size_t>(a)][static_cast<std::size_t>(b)];
        }
    }
    const Eigen::MatrixXd factor = Eigen::LLT<Eigen::MatrixXd>(covariance).matrixL();
    const auto draws = static_cast<std::size_t>(tallies.draws);
    const std::size_t radii = radii_pc.size();
    ClassGroup everything{"all", {}};
    everything.categories.set();

    // [radius][group][draw] corrected counts and missing numbers, [radius][draw] corrected totals.
    std::vector<std::vector<std::vector<double>>> counts(
        radii, std::vector<std::vector<double>>(groups.size(), std::vector<double>(draws)));
    auto missing = counts;
    std::vector<std::vector<double>> totals(radii, std::vector<double>(draws));
    std::vector<std::vector<UnseenTerm>> unseen_terms;
    for (const double radius : radii_pc) {
        unseen_terms.push_back(unseenTerms(model, radius, limits));
    }
    // The catalogued counts per radius, group and draw, to which each draw adds its unseen objects.
    std::vector<std::vector<std::vector<double>>> seen(radii);
    std::vector<std::vector<double>> seen_totals(radii);
    for (std::size_t r = 0; r < radii; ++r) {
        seen_totals[r] = groupCountsByDraw(tallies, r, everything);
        for (const ClassGroup& group : groups) {
            seen[r].push_back(groupCountsByDraw(tallies, r, group));
        }
    }
    // Each draw has its own stream and its own slots, so the result does not depend on the threads.
    const auto correct_draw = [&](std::size_t d) {
        Xoshiro256 random(seed, kCorrectionStreamBase + d);
        const std::vector<double> theta = drawParameters(fit, factor, random);
        const std::vector<double> shares =
            model.cellShares(InitialMassFunction(imfWithParameters(fit.family, fit.imf, theta)));
        for (std::size_t r = 0; r < radii; ++r) {
            const PerCategory expected = unseenCounts(unseen_terms[r], shares);
            PerCategory unseen{};
            double unseen_total = 0.0;
            for (std::size_t k = 0; k < photometry::kCategoryCount; ++k) {
                const double mean =
                    theta[0] * expected[k] - (beyond_limits.empty() ? 0.0 : beyond_limits[r][k]);
                if (mean > 0.0) {
                    unseen[k] = static_cast<double>(std::poisson_distribution<std::int64_t>(mean)(random));
                    unseen_total += unseen[k];
                }
            }
            totals[r][d] = seen_totals[r][d] + unseen_total;
            for (std::size_t g = 0; g < groups.size(); ++g) {
                double group_unseen = 0.0;
                for (std::size_t k = 0; k < photometry::kCategoryCount; ++k) {
                    group_unseen += groups[g].categories.test(k) ? unseen[k] : 0.0;
                }
                missing[r][g][d] = group_unseen;
                counts[r][g][d] = seen[r][g][d] + group_unseen;
            }
        }
    };
    forEachIndex(draws, threads, correct_draw);

    const std::vector<double> best_shares = model.cellShares(InitialMassFunction(fit.imf));
    std::vector<CorrectedRadius> result;
    for (std::size_t r = 0; r < radii; ++r) {
        const PerCategory best_all = allCounts(model, best_shares, sphereVolumePc3(radii_pc[r]));
        const PerCategory best_unseen = unseenCounts(unseen_terms[r], best_shares);
        CorrectedRadius corrected;
        corrected.radius_pc = radii_pc[r];
        for (std::size_t g = 0; g < groups.size(); ++g) {
            double full = 0.0;
            double unseen = 0.0;
            for (std::size_t k = 0; k < photometry::kCategoryCount; ++k) {
                if (groups[g].categories.test(k)) {
                    full += best_all[k];
                    unseen += best_unseen[k];
                }
            }
            CorrectedGroup group;
            group.name = groups[g].name;
            group.completeness = full > 0.0 ? 1.0 - unseen / full : std::numeric_limits<double>::quiet_NaN();
            group.corrected = unseen > 0.0;
            std::vector<double> fraction(draws);
            for (std::size_t d = 0; d < draws; ++d) {
                fraction[d] = totals[r][d] > 0.0 ? counts[r][g][d] / totals[r][d] : 0.0;
            }
            group.fraction = summarizeDraws(fraction);
            group.count = summarizeDraws(counts[r][g]);
            group.missing = summarizeDraws(missing[r][g]);
            corrected.groups.push_back(std::move(group));
        }
        corrected.total = summarizeDraws(totals[r]);
        result.push_back(std::move(corrected));
    }
    return result;
}

} // namespace starcensus::census
