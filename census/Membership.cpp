#include "census/Membership.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace starcensus::census {

namespace {

// The Gaussian likelihood is negligible beyond this many standard deviations (exp(-50) ~ 2e-22).
constexpr double kLikelihoodHalfWidthSigma = 10.0;
// Grid nodes across the posterior: spacing of ~0.05 sigma keeps the trapezoid error far below 1e-6.
constexpr int kGridNodes = 401;

double lowerParallaxLimitMas(const MembershipSettings& settings) {
    return 1000.0 / settings.outer_distance_pc;
}

double logPrior(double log_true_parallax, DistancePrior prior) {
    // Constant space density: p(r) dr ∝ r^2 dr with r = 1000/t gives p(t) ∝ t^-4 (Bailer-Jones 2015, Eq. 17
    // written in parallax).
    return prior == DistancePrior::ConstantDensity ? -4.0 * log_true_parallax : 0.0;
}

double correctedParallax(double parallax_mas, const MembershipSettings& settings) {
    return parallax_mas - settings.parallax_zero_point_mas;
}

double distanceModulusOfParallax(double true_parallax_mas) {
    // mu = 5 log10(d / 10 pc) with d = 1000 / t  =>  mu = 5 log10(100 / t).
    return 5.0 * std::log10(100.0 / true_parallax_mas);
}

} // namespace

DistancePosterior::DistancePosterior(double parallax_mas, double parallax_error_mas,
                                     const MembershipSettings& settings) {
    const double observed = correctedParallax(parallax_mas, settings);
    const double sigma = parallax_error_mas * settings.parallax_error_inflation;
    const double lower_limit = lowerParallaxLimitMas(settings);

    const double lower = std::max(lower_limit, observed - kLikelihoodHalfWidthSigma * sigma);
    // A parallax far below the prior's lower limit leaves all posterior mass at the outer distance.
    const double upper = std::max(observed + kLikelihoodHalfWidthSigma * sigma, lower * (1.0 + 1e-6));

    // Nodes evenly spaced in log t: they follow both a narrow Gaussian (nearly even in t) and the steep
    // t^-4 prior near the outer distance (even in log t).
    true_parallax_mas_.resize(kGridNodes);
    std::vector<double> log_density(kGridNodes);
    const double log_lower = std::log(lower);
    const double log_step = std::log(upper / lower) / (kGridNodes - 1);
    const double step_factor = std::exp(log_step);
    double max_log_density = -std::numeric_limits<double>::infinity();
    double grid_parallax = lower;
    for (int k = 0; k < kGridNodes; ++k, grid_parallax *= step_factor) {
        true_parallax_mas_[static_cast<std::size_t>(k)] = grid_parallax;
        const double z = (observed - grid_parallax) / sigma;
        log_density[static_cast<std::size_t>(k)] =
            logPrior(log_lower + k * log_step, settings.prior) - 0.5 * z * z;
        max_log_density = std::max(max_log_density, log_density[static_cast<std::size_t>(k)]);
    }

    cdf_in_parallax_.assign(kGridNodes, 0.0);
    double previous_density = std::exp(log_density[0] - max_log_density);
    for (std::size_t k = 1; k < static_cast<std::size_t>(kGridNodes); ++k) {
        const double density = std::exp(log_density[k] - max_log_density);
        cdf_in_parallax_[k] =
            cdf_in_parallax_[k - 1] +
            0.5 * (density + previous_density) * (true_parallax_mas_[k] - true_parallax_mas_[k - 1]);
        previous_density = density;
    }
    const double total = cdf_in_parallax_.back();
    for (double& value : cdf_in_parallax_) {
        value /= total;
    }

    // Quantiles of the distance modulus: u = P(mu' < mu) = P(t' > t) = 1 - CDF(t).
    std::size_t node = cdf_in_parallax_.size() - 1;
    for (int j = 0; j < kQuantileNodes; ++j) {
        const double target_cdf = 1.0 - static_cast<double>(j) / (kQuantileNodes - 1);
        while (node > 0 && cdf_in_parallax_[node - 1] >= target_cdf) {
            --node;
        }
        double t = true_parallax_mas_[node];
        if (node > 0) {
            const double c0 = cdf_in_parallax_[node - 1];
            const double c1 = cdf_in_parallax_[node];
            const double fraction = c1 > c0 ? (target_cdf - c0) / (c1 - c0) : 1.0;
            t = true_parallax_mas_[node - 1] +
                fraction * (true_parallax_mas_[node] - true_parallax_mas_[node - 1]);
        }
        modulus_quantiles_[static_cast<std::size_t>(j)] = static_cast<float>(distanceModulusOfParallax(t));
    }
}

double DistancePosterior::probabilityWithin(double radius_pc) const {
    const double boundary = 1000.0 / radius_pc;
    if (boundary <= true_parallax_mas_.front()) {
        return 1.0;
    }
    if (boundary >= true_parallax_mas_.back()) {
        return 0.0;
    }
    const auto above = std::upper_bound(true_parallax_mas_.begin(), true_parallax_mas_.end(), boundary);
    const auto k = static_cast<std::size_t>(above - true_parallax_mas_.begin());
    const double fraction =
        (boundary - true_parallax_mas_[k - 1]) / (true_parallax_mas_[k] - true_parallax_mas_[k - 1]);
    const double cdf = cdf_in_parallax_[k - 1] + fraction * (cdf_in_parallax_[k] - cdf_in_parallax_[k - 1]);
    return std::clamp(1.0 - cdf, 0.0, 1.0);
}

double DistancePosterior::distanceModulusAt(double u) const {
    const double position = std::clamp(u, 0.0, 1.0) * (kQuantileNodes - 1);
    const auto k = std::min(static_cast<std::size_t>(position), static_cast<std::size_t>(kQuantileNodes - 2));
    const double fraction = position - static_cast<double>(k);
    return modulus_quantiles_[k] + fraction * (modulus_quantiles_[k + 1] - modulus_quantiles_[k]);
}

double DistancePosterior::medianDistancePc() const {
    return 10.0 * std::pow(10.0, distanceModulusAt(0.5) / 5.0);
}

double membershipProbability(double parallax_mas, double parallax_error_mas, double radius_pc,
                             const MembershipSettings& settings) {
    return DistancePosterior(parallax_mas, parallax_error_mas, settings).probabilityWithin(radius_pc);
}

bool insideByHardCut(double parallax_mas, double radius_pc, const MembershipSettings& settings) {
    return correctedParallax(parallax_mas, settings) > 1000.0 / radius_pc;
}

} // namespace starcensus::census
