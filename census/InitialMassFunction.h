#pragma once
// Stellar initial mass functions: the number of systems per unit mass, normalised over a mass range,
// with exact integrals (for fits and tests) and exact sampling.
//   Kroupa (2001, MNRAS 322, 231, eq. 2): dN/dm ∝ m^-alpha, alpha = 0.3 (m < 0.08 Msun), 1.3
//     (0.08-0.5 Msun), 2.3 (m > 0.5 Msun), continuous at the breaks.
//   Chabrier (2003, PASP 115, 763, Table 1, single objects; values from memory): dN/dlog10(m) ∝
//     exp(-(log10 m - log10 0.079)^2 / (2 * 0.69^2)) for m <= 1 Msun, joined continuously to
//     dN/dlog10(m) ∝ m^-1.3 (Salpeter-like x = 1.3) above.
#include "census/Random.h"

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::census {

enum class ImfFamily : std::uint8_t {
    Kroupa2001,
    Chabrier2003,
};

std::string imfFamilyName(ImfFamily family); // "kroupa" or "chabrier"

struct ImfSettings {
    ImfFamily family = ImfFamily::Kroupa2001;
    double mass_min_msun = 0.01;  // lower end of the sampled range (Msun); common practice, no source
    double mass_max_msun = 100.0; // upper end (Msun); common practice, no source
    // Kroupa 2001 eq. 2: slopes of dN/dm and the masses (Msun) where they change.
    double kroupa_alpha_low = 0.3;
    double kroupa_alpha_mid = 1.3;
    double kroupa_alpha_high = 2.3;
    double kroupa_break_low_msun = 0.08;
    double kroupa_break_high_msun = 0.5;
    // Chabrier 2003 Table 1 (single objects; from memory): log-normal peak mass (Msun) and width (dex)
    // below the join mass (Msun), slope x of dN/dlog10(m) ∝ m^-x above it.
    double chabrier_peak_mass_msun = 0.079;
    double chabrier_sigma_dex = 0.69;
    double chabrier_join_msun = 1.0;
    double chabrier_x_high = 1.3;
};

/// Throws InputError naming the option (--imf-...) when a parameter is out of range.
void validateImfSettings(const ImfSettings& settings);

class InitialMassFunction {
  public:
    explicit InitialMassFunction(const ImfSettings& settings);

    /// dN/dm (per Msun), normalised to 1 over [mass_min, mass_max]; 0 outside.
    double density(double mass_msun) const;
    /// The fraction of systems with mass in [low, high] (exact integral of density()).
    double fractionBetween(double low_msun, double high_msun) const;
    /// The fraction of systems with mass below `mass_msun` (fractionBetween(0, mass_msun)).
    double fractionBelow(double mass_msun) const { return fractionBelowLn(std::log(mass_msun)); }
    /// The same at ln(mass / Msun), for callers that evaluate fixed masses under many IMFs (one exp or
    /// erf per piece instead of a pow).
    double fractionBelowLn(double ln_mass_msun) const;
    /// One mass (Msun), by exact inversion (power-law pieces) or truncated-normal rejection (log-normal).
    double sample(Xoshiro256& random) const;

    const ImfSettings& settings() const { return settings_; }

  private:
    // One piece of the IMF on [low, high]. Power law: dN/dm = coefficient * m^-slope. Log-normal:
    // dN/dlog10 m = coefficient * exp(-(log10 m - mu)^2 / (2 sigma^2)).
    struct Piece {
        bool log_normal = false;
        double low = 0.0;
        double high = 0.0;
        double coefficient = 1.0;
        double slope = 0.0;
        double mu = 0.0;
        double sigma = 1.0;
        double integral = 0.0; // number in the piece before normalisation
        double ln_low = 0.0;   // ln(low), ln(high)
        double ln_high = 0.0;
        double primitive_low = 0.0; // primitive() at low
    };
    /// The antiderivative of dN/dm at ln(m): power law coefficient m^(1-slope) / (1-slope) (or
    /// coefficient ln m), log-normal coefficient sigma sqrt(pi/2) erf((log10 m - mu) / (sigma sqrt 2)).
    static double primitive(const Piece& piece, double ln_mass);
    static double integrate(const Piece& piece, double low, double high);
    static double densityOf(const Piece& piece, double mass_msun);

    ImfSettings settings_;
    std::vector<Piece> pieces_;
    std::vector<double> cumulative_; // normalised cumulative integral at each piece's upper end
    double total_ = 1.0;
};

} // namespace starcensus::census
