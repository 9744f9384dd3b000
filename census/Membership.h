#pragma once
// Distance posteriors from a measured parallax, and the probability that a star lies within a radius.
//
// Likelihood: the measured parallax is Gaussian about the true one, p(plx_obs | t) = N(plx_obs; t, sigma),
// with the catalogue's error inflated by a factor and the zero-point offset subtracted first
// (Lindegren et al. 2021, A&A 649, A4). Priors on the distance r = 1000 / t pc:
//  - constant space density, p(r) ∝ r^2 for 0 < r <= r_max, i.e. p(t) ∝ t^-4 for t >= 1000 / r_max
//    (Lutz & Kelker 1973, PASP 85, 573; Bailer-Jones 2015, PASP 127, 994, Sect. 5);
//  - flat in parallax, p(t) = const for t >= 1000 / r_max (a "no prior" reference case).
// Then P(r < R | plx_obs) = ∫_{1000/R}^∞ p(t) N(plx_obs; t, sigma) dt / ∫_{1000/r_max}^∞ (same) dt.
#include "photometry/catalog/CatalogRow.h"

#include <array>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

namespace starcensus::census {

enum class DistancePrior : std::uint8_t { ConstantDensity, FlatParallax };

/// Settings of the membership model; the defaults are the documented ones.
struct MembershipSettings {
    DistancePrior prior = DistancePrior::ConstantDensity;
    double outer_distance_pc = 200.0;      // prior truncation r_max (pc); must exceed every census radius
    double parallax_zero_point_mas = 0.0;  // subtracted from measured parallaxes (mas); DR3: about -0.017
    double parallax_error_inflation = 1.0; // multiplies catalogue parallax errors (dimensionless)
    // Posteriors of stars with (inflated) parallax error / parallax at or below this, far from the prior's
    // truncation, are taken as Gaussian (Laplace approximation, Membership.cpp) instead of tabulated on
    // the grid: same probabilities within ~1e-5, ~100 times faster. 0 disables (dimensionless).
    double gaussian_shortcut_max_relative_error = 0.02;
};

/// The posterior of one star's true parallax, tabulated for fast probabilities and random draws.
class DistancePosterior {
  public:
    /// Quantile nodes stored for random draws (distance modulus at equally spaced probabilities).
    static constexpr int kQuantileNodes = 65;
    /// Nodes of the tabulated posterior (see Membership.cpp).
    static constexpr int kGridNodes = 401;

    /// How much of the quantile table the constructor fills: all of it, or (Deferred) on the Gaussian
    /// shortcut only its two ends until tabulateQuantiles(), for callers that may need no more.
    enum class Quantiles : std::uint8_t { Tabulated, Deferred };

    /// parallax_mas and parallax_error_mas are the catalogue values (before zero point and inflation).
    DistancePosterior(double parallax_mas, double parallax_error_mas, const MembershipSettings& settings,
                      Quantiles quantiles = Quantiles::Tabulated);

    /// Fills the quantile table of a Deferred posterior (no effect on a tabulated one). The ends below
    /// are the same before and after.
    void tabulateQuantiles();

    /// P(true distance < radius_pc).
    double probabilityWithin(double radius_pc) const;

    /// Posterior median distance (pc).
    double medianDistancePc() const;

    /// Distance modulus 5 log10(d / 10 pc) at cumulative probability u in [0, 1], interpolated.
    double distanceModulusAt(double u) const;

    /// The tabulated distance moduli at u = k / (kQuantileNodes - 1), nearest star first (mag); of a
    /// Deferred posterior, after tabulateQuantiles().
    const std::array<float, kQuantileNodes>& distanceModulusQuantiles() const { return modulus_quantiles_; }

    /// The smallest and largest distance modulus of the table (mag): the range of every draw. Known
    /// before tabulateQuantiles().
    float nearestModulus() const { return nearest_modulus_; }
    float farthestModulus() const { return farthest_modulus_; }

    /// A Gaussian-shortcut posterior in 24 bytes, from which its quantile table is filled again exactly
    /// (what tabulateQuantiles() gives, 260 bytes): for callers that hold many stars' tables.
    struct GaussianForm {
        double mean_mas; // posterior mean and sd of the true parallax (mas)
        double sd_mas;
        float nearest_modulus; // the table's ends (mag)
        float farthest_modulus;
        void fillQuantiles(std::array<float, kQuantileNodes>& quantiles) const;
    };
    /// This posterior's GaussianForm, or none when it is tabulated on the grid.
    std::optional<GaussianForm> gaussianForm() const;

  private:
    void setGaussian(double observed_mas, double sigma_mas, DistancePrior prior, Quantiles quantiles);

    double gaussian_mean_mas_ = 0.0; // Gaussian shortcut: posterior mean and sd of the true parallax;
    double gaussian_sd_mas_ = 0.0;   // sd 0 = the grid below is used
    bool quantiles_tabulated_ = true;
    float nearest_modulus_ = 0.0f;
    float farthest_modulus_ = 0.0f;
    // Written in full by the grid path and never read on the Gaussian shortcut, so not zeroed: that was
    // 6.4 kB of stores for every shortcut star.
    std::array<double, kGridNodes> true_parallax_mas_; // grid, increasing
    std::array<double, kGridNodes> cdf_in_parallax_;   // P(t < grid value), increasing from 0 to 1
    std::array<float, kQuantileNodes> modulus_quantiles_{};
};

/// Probability within radius_pc for one star, without keeping its table.
double membershipProbability(double parallax_mas, double parallax_error_mas, double radius_pc,
                             const MembershipSettings& settings);

/// The classic hard cut: corrected parallax > 1000 / radius_pc.
bool insideByHardCut(double parallax_mas, double radius_pc, const MembershipSettings& settings);

/// Rows inside each radius by the hard cut: the "hard_cut_members" of fractions.json. With `only`, the rows
/// at those indices alone.
std::vector<std::int64_t> hardCutCounts(std::span<const photometry::CatalogRow> rows,
                                        const std::vector<double>& radii_pc,
                                        const MembershipSettings& settings,
                                        std::span<const std::uint32_t> only = {});

} // namespace starcensus::census
