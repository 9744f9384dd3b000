#pragma once
// The luminosity function predicted by an initial mass function, and its Poisson maximum-likelihood fit
// to the binned main-sequence counts.
//
// Model (LuminosityModel): a stellar system of primary mass m drawn from the IMF xi(m)
// (InitialMassFunction.h).
//  - Hydrogen burners on the main sequence: M_G(m) from the dwarf locus (mass -> spectral code -> M_G,
//    photometry/DwarfLocus.h through photometry/ModelPhotometry.h), i.e. Phi(M_G) = n xi(m(M_G)) |dm/dM_G|,
//    integrated exactly over cells in mass (each cell's share is an exact IMF integral, so plateaus of the
//    mass-magnitude relation need no derivative). Above 1 Msun only the share t_MS(m) / T of a constant
//    star-formation history of age T is still on the main sequence (Miller & Scalo 1979, ApJS 41, 513),
//    t_MS = t_sun (m / Msun)^-2.5 (common practice, no source).
//  - Brown dwarfs (below the hydrogen-burning limit): ages uniform in [0, T], Teff(m, t) from the
//    Burrows et al. (2001) approximation (brownDwarfTeffK, photometry/ModelPhotometry.h), Teff -> code ->
//    M_G.
//  - An intrinsic Gaussian scatter in M_G; a star of M_G counts in a survey volume V_eff(M_G)
//    (Completeness.h).
// Fit (fitMassFunction): binned Poisson likelihood ln L = sum_i [n_i ln mu_i - mu_i - ln Gamma(n_i + 1)]
// (Cash 1979, ApJ 228, 939) over the complete main-sequence bins inside the fit range, maximised by
// Levenberg-Marquardt steps on Fisher scoring (numerical Jacobian of mu), covariance = inverse of the
// numerical Hessian of -ln L at the maximum. Goodness of fit: the Poisson deviance (Cash statistic
// C = 2 sum [mu - n + n ln(n / mu)]) with bins - parameters degrees of freedom and its chi-square p-value.
// Parameters: number density of systems (pc^-3, over the IMF's whole mass range) and the shape:
//  - chabrier2003: peak_mass_msun, sigma_dex (log-normal below the join; the power law above fixed);
//  - kroupa2001: alpha_mid, alpha_high (slopes of dN/dm; the low slope and the breaks fixed).
#include "census/Completeness.h"
#include "census/InitialMassFunction.h"
#include "census/LuminosityFunction.h"
#include "photometry/ModelPhotometry.h"

#include <array>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

namespace starcensus::census {

struct LuminosityModelSettings {
    int mass_cells = 1200;              // log-spaced cells over the IMF's mass range
    int brown_dwarf_age_cells = 60;     // uniform age cells per brown-dwarf mass cell
    double intrinsic_scatter_mag = 0.1; // Gaussian scatter of M_G about the locus (mag; common practice)
    double disc_age_gyr = 10.0;         // constant star formation over this time (Gyr; common practice)
    double ms_lifetime_sun_gyr = 10.0;  // t_MS at 1 Msun (Gyr; common practice, no source)
    double ms_lifetime_exponent = -2.5;
    double hydrogen_burning_limit_msun = 0.075; // (common practice, no source)
    double brown_dwarf_teff_min_k = 250.0;      // clamp of the cooling law (the coolest locus type, Y4V)
    double brown_dwarf_teff_max_k = 2900.0;     // (the law overshoots for young, massive brown dwarfs)
};

/// The model's mass cells and, per cell, the (M_G, category, weight) of what the cell's systems look
/// like today. Built once; evaluated for any IMF of the same mass range.
class LuminosityModel {
  public:
    struct Element {
        std::uint32_t cell;
        float abs_g_mag;
        photometry::Category category;
        float weight; // share of the cell's systems (main-sequence share, or one age cell)
    };

    LuminosityModel(double mass_min_msun, double mass_max_msun, const LuminosityModelSettings& settings,
                    const photometry::ModelPhotometry& photometry);

    /// The IMF share of each mass cell (sums to 1 over the IMF's range).
    std::vector<double> cellShares(const InitialMassFunction& imf) const;
    const std::vector<Element>& elements() const { return elements_; }
    std::size_t cells() const { return edges_msun_.size() - 1; }
    const LuminosityModelSettings& settings() const { return settings_; }

    /// K[b * cells() + j]: expected systems per unit density in the M_G bin b = [lo, hi) inside
    /// radius_pc from mass cell j at share 1: the sum over the cell's elements of
    /// weight * P(bin | M_G, scatter) * V_eff(M_G). The expected counts are density * K * shares.
    std::vector<double> responseMatrix(std::span<const std::array<double, 2>> bins, double radius_pc,
                                       const MagnitudeLimits& limits) const;

  private:
    LuminosityModelSettings settings_;
    std::vector<double> edges_msun_;
    std::vector<double> ln_edges_msun_; // ln of edges_msun_, for cellShares()
    std::vector<Element> elements_;
};

struct MassFunctionFitSettings {
    ImfFamily family = ImfFamily::Chabrier2003;
    ImfSettings start;               // starting shape and the fixed parameters (Chabrier 2003 / Kroupa 2001)
    double fit_abs_g_min_mag = 5.0;  // fitted M_G range: about 1 Msun (G9V) ...
    double fit_abs_g_max_mag = 16.0; // ... to the hydrogen-burning limit (M8.5V), where M_G(m) is a locus
    int max_iterations = 100;
    double tolerance = 1e-8; // stop when ln L changes by less than this
};

/// Throws InputError naming the option (--lf-fit-min, --lf-fit-max) for a value out of range.
void validateMassFunctionFitSettings(const MassFunctionFitSettings& settings);

struct MassFunctionFitResult {
    ImfFamily family = ImfFamily::Chabrier2003;
    bool converged = false;
    int iterations = 0;
    std::string message;            // "converged", or why not
    std::vector<std::string> names; // density_per_pc3, then the shape parameters
    std::vector<double> values;     // at the maximum (or the last point reached)
    std::vector<double> errors;     // sqrt of the covariance diagonal; NaN if unavailable
    std::vector<std::vector<double>> covariance;
    double log_likelihood = 0.0;
    double deviance = 0.0; // Cash statistic
    int degrees_of_freedom = 0;
    double p_value = 0.0;
    int bins_used = 0;
    std::array<double, 2> fit_abs_g_mag{}; // [lo, hi] of the bins used
    ImfSettings imf;                       // the IMF at `values`
};

/// "chabrier2003" or "kroupa2001".
std::string fitModelName(ImfFamily family);

/// Whether a parameter vector (density first) lies inside the box where the fit's IMF is defined.
bool parametersValid(ImfFamily family, std::span<const double> values);

/// The IMF with a parameter vector (density first, ignored) applied to `base`.
ImfSettings imfWithParameters(ImfFamily family, const ImfSettings& base, std::span<const double> values);

/// Fits the main-sequence bins of `table` that are complete and inside the fit range.
MassFunctionFitResult fitMassFunction(std::span<const LfBin> table, const LuminosityModel& model,
                                      double radius_pc, const MagnitudeLimits& limits,
                                      const MassFunctionFitSettings& settings);

/// The model's bin-averaged Phi (stars pc^-3 mag^-1) in each bin, for a converged fit.
std::vector<double> modelPhi(const MassFunctionFitResult& fit, const LuminosityModel& model,
                             std::span<const std::array<double, 2>> bins);

} // namespace starcensus::census
