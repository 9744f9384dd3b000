#include "census/Membership.h"

#include "census/detail/FastNormal.h"
#include "census/detail/VectorMath.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numbers>

namespace starcensus::census {

namespace {

// The Gaussian likelihood is negligible beyond this many standard deviations (exp(-24.5) ~ 2e-11; the
// mass outside is ~3e-12).
constexpr double kLikelihoodHalfWidthSigma = 10.0;
// Grid nodes across the posterior: a spacing of 0.05 sigma, which keeps the linear interpolation of the
// tabulated CDF within ~1e-4 of direct integration (tests/census/MembershipTest.cpp).
constexpr int kGridNodes = DistancePosterior::kGridNodes;
static_assert(kGridNodes == 401, "0.05 sigma spacing over +-10 sigma");

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

// distanceModulusOfParallax() of each of the quantile table's parallaxes (mas), with the vector log10:
// the table's moduli (mag).
void distanceModuliOfParallaxes(std::array<double, DistancePosterior::kQuantileNodes> parallax_mas,
                                std::array<float, DistancePosterior::kQuantileNodes>& moduli) {
    for (double& value : parallax_mas) {
        value = 100.0 / value;
    }
    detail::log10InPlace(parallax_mas);
    for (std::size_t j = 0; j < moduli.size(); ++j) {
        moduli[j] = static_cast<float>(5.0 * parallax_mas[j]);
    }
}

} // namespace

DistancePosterior::DistancePosterior(double parallax_mas, double parallax_error_mas,
                                     const MembershipSettings& settings, Quantiles quantiles) {
    const double observed = correctedParallax(parallax_mas, settings);
    const double sigma = parallax_error_mas * settings.parallax_error_inflation;
    const double lower_limit = lowerParallaxLimitMas(settings);
    if (observed > 0.0 && sigma <= settings.gaussian_shortcut_max_relative_error * observed &&
        observed - kLikelihoodHalfWidthSigma * sigma > lower_limit) {
        setGaussian(observed, sigma, settings.prior, quantiles);
        return;
    }

    const double lower = std::max(lower_limit, observed - kLikelihoodHalfWidthSigma * sigma);
    // A parallax far below the prior's lower limit leaves all posterior mass at the outer distance.
    const double upper = std::max(observed + kLikelihoodHalfWidthSigma * sigma, lower * (1.0 + 1e-6));

    // Nodes evenly spaced in log t: they follow both a narrow Gaussian (nearly even in t) and the steep
    // t^-4 prior near the outer distance (even in log t).
    std::array<double, kGridNodes> log_density;
    const double log_lower = std::log(lower);
    const double log_step = std::log(upper / lower) / (kGridNodes - 1);
    const double step_factor = std::exp(log_step);
    const double inverse_sigma = 1.0 / sigma;
    // One loop for the grid and the log density: the grid's running product and the running maximum are
    // two serial chains of 401 steps, which then overlap (the same arithmetic as two loops).
    double grid_parallax = lower;
    double max_log_density = -std::numeric_limits<double>::infinity();
    for (std::size_t k = 0; k < static_cast<std::size_t>(kGridNodes); ++k, grid_parallax *= step_factor) {
        true_parallax_mas_[k] = grid_parallax;
        const double z = (observed - grid_parallax) * inverse_sigma;
        log_density[k] =
            logPrior(log_lower + static_cast<double>(k) * log_step, settings.prior) - 0.5 * z * z;
        max_log_density = std::max(max_log_density, log_density[k]);
    }
    std::array<double, kGridNodes> density;
    for (std::size_t k = 0; k < static_cast<std::size_t>(kGridNodes); ++k) {
        density[k] = log_density[k] - max_log_density;
    }
    detail::expInPlace(density);

    cdf_in_parallax_[0] = 0.0;
    for (std::size_t k = 1; k < static_cast<std::size_t>(kGridNodes); ++k) {
        cdf_in_parallax_[k] =
            cdf_in_parallax_[k - 1] +
            0.5 * (density[k] + density[k - 1]) * (true_parallax_mas_[k] - true_parallax_mas_[k - 1]);
    }
    const double inverse_total = 1.0 / cdf_in_parallax_.back();
    for (double& value : cdf_in_parallax_) {
        value *= inverse_total;
    }

    // Quantiles of the distance modulus: u = P(mu' < mu) = P(t' > t) = 1 - CDF(t).
    std::array<double, kQuantileNodes> quantile_parallax_mas;
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
        quantile_parallax_mas[static_cast<std::size_t>(j)] = t;
    }
    distanceModuliOfParallaxes(quantile_parallax_mas, modulus_quantiles_);
    const auto [nearest, farthest] =
        std::minmax_element(modulus_quantiles_.begin(), modulus_quantiles_.end());
    nearest_modulus_ = *nearest;
    farthest_modulus_ = *farthest;
}

namespace {

/// z_j with P(Z > z_j) = j / (kQuantileNodes - 1): u = P(t' > t) as in the grid's quantiles.
const std::array<double, DistancePosterior::kQuantileNodes>& standardNormalQuantiles() {
    constexpr int kNodes = DistancePosterior::kQuantileNodes;
    static const std::array<double, kNodes> quantiles = [] {
        std::array<double, kNodes> z{};
        for (int j = 1; j + 1 < kNodes; ++j) {
            z[static_cast<std::size_t>(j)] =
                detail::FastNormal::inverseNormalCdf(1.0 - static_cast<double>(j) / (kNodes - 1));
        }
        return z;
    }();
    return quantiles;
}

} // namespace

void DistancePosterior::setGaussian(double observed, double sigma, DistancePrior prior, Quantiles quantiles) {
    // Laplace approximation about the measured parallax u = t - plx: log p = -4 ln t - u^2 / (2 sigma^2)
    // ~ const - 4u / plx + 2u^2 / plx^2 - u^2 / (2 sigma^2), a Gaussian of precision 1/sigma^2 - 4/plx^2
    // centred at plx - (4/plx) / precision (the Lutz-Kelker shift). The neglected cubic term skews the
    // posterior by -8 (sigma/plx)^3, below 7e-5 for sigma/plx <= 0.02: far inside the 0.05-sigma grid's
    // own error. The flat prior leaves the likelihood itself.
    double precision = 1.0 / (sigma * sigma);
    double mean = observed;
    if (prior == DistancePrior::ConstantDensity) {
        precision -= 4.0 / (observed * observed);
        mean -= 4.0 / observed / precision;
    }
    gaussian_mean_mas_ = mean;
    gaussian_sd_mas_ = 1.0 / std::sqrt(precision);
    // The grid's outermost quantiles are its ends, observed -/+ kLikelihoodHalfWidthSigma sigma; the same
    // ends here keep the random draws' range. The nodes between increase with j (z_j decreases, and the
    // ends lie 10 sigma out against |z_j| <= 2.2), so the ends are the table's extremes.
    nearest_modulus_ =
        static_cast<float>(distanceModulusOfParallax(observed + kLikelihoodHalfWidthSigma * sigma));
    farthest_modulus_ =
        static_cast<float>(distanceModulusOfParallax(observed - kLikelihoodHalfWidthSigma * sigma));
    modulus_quantiles_.front() = nearest_modulus_;
    modulus_quantiles_.back() = farthest_modulus_;
    quantiles_tabulated_ = false;
    if (quantiles == Quantiles::Tabulated) {
        tabulateQuantiles();
    }
}

void DistancePosterior::GaussianForm::fillQuantiles(std::array<float, kQuantileNodes>& quantiles) const {
    const auto& z = standardNormalQuantiles();
    std::array<double, kQuantileNodes> parallax_mas;
    for (std::size_t j = 0; j < parallax_mas.size(); ++j) {
        parallax_mas[j] = mean_mas + sd_mas * z[j];
    }
    distanceModuliOfParallaxes(parallax_mas, quantiles);
    // The ends are the likelihood window's, not z = 0's.
    quantiles.front() = nearest_modulus;
    quantiles.back() = farthest_modulus;
}

std::optional<DistancePosterior::GaussianForm> DistancePosterior::gaussianForm() const {
    if (!(gaussian_sd_mas_ > 0.0)) {
        return std::nullopt;
    }
    return GaussianForm{gaussian_mean_mas_, gaussian_sd_mas_, nearest_modulus_, farthest_modulus_};
}

void DistancePosterior::tabulateQuantiles() {
    if (quantiles_tabulated_) {
        return;
    }
    gaussianForm()->fillQuantiles(modulus_quantiles_);
    quantiles_tabulated_ = true;
}

double DistancePosterior::probabilityWithin(double radius_pc) const {
    const double boundary = 1000.0 / radius_pc;
    if (gaussian_sd_mas_ > 0.0) {
        return 0.5 * std::erfc((boundary - gaussian_mean_mas_) / (gaussian_sd_mas_ * std::numbers::sqrt2));
    }
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

std::vector<std::int64_t> hardCutCounts(std::span<const photometry::CatalogRow> rows,
                                        const std::vector<double>& radii_pc,
                                        const MembershipSettings& settings,
                                        std::span<const std::uint32_t> only) {
    std::vector<std::int64_t> counts;
    const std::size_t n = only.empty() ? rows.size() : only.size();
    for (const double radius : radii_pc) {
        std::int64_t inside = 0;
        for (std::size_t k = 0; k < n; ++k) {
            const photometry::CatalogRow& row = only.empty() ? rows[k] : rows[only[k]];
            inside += insideByHardCut(row.parallax_mas, radius, settings) ? 1 : 0;
        }
        counts.push_back(inside);
    }
    return counts;
}

} // namespace starcensus::census
