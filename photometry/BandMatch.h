#pragma once
// Spectral code of a dwarf from whichever of Johnson B, V, 2MASS J, H, Ks and WISE W1, W2 an object has:
// the code whose relations best match all of its absolute magnitudes, weighed by the band errors, the
// distance-modulus error and an intrinsic scatter. The classifier (photometry/Classifier.h) uses it for
// objects without Gaia BP-RP.
//
// Relations, absolute magnitude against spectral code (M_b(code)):
//  - B, V, J, H, Ks: the Pecaut & Mamajek locus (photometry/DwarfLocus.h): M_V, M_V + (B-V), M_J,
//    M_J - (J-H), M_Ks, as far as the table gives each (M_V to L4V, B-V to M9V, J-H to T9V, M_Ks to Y2V).
//  - W1, W2 earlier than M6V: M_Ks - (Ks-W1) and that minus (W1-W2) of the same locus; from M6V to T9V the
//    polynomials of Dupuy & Liu 2012 (ApJS 201, 19) and for Y dwarfs M_W2 from memory
//    (data/ultracool_wise_absolute_magnitudes.txt says which is which).
//
// The fit. For the bands present, r_b = M_b,observed - M_b(code). The residuals share two terms: the
// distance modulus (its error moves every absolute magnitude together) and the scatter of a type's
// luminosity (unresolved binaries, age, metallicity move all bands together too), while the band errors
// and the scatter of a type's colours are separate per band. So the covariance is
//   C = diag(sigma_b^2 + sigma_colour^2) + (sigma_modulus^2 + sigma_luminosity^2) 1 1^T
// and chi^2 = r^T C^-1 r, computed with the Sherman-Morrison formula (Press et al., Numerical Recipes,
// 3rd ed., section 2.7). This is the same as fitting the colours plus one magnitude with the common offset
// marginalised over a Gaussian of width sqrt(sigma_modulus^2 + sigma_luminosity^2). A band the relations do
// not reach at a code adds 1 (its expected chi^2) so that codes are compared over the same number of terms,
// and a code must reach two of the bands present (one if only one is): a colour at least (common practice,
// no source). The minimum is found on a 0.1-subtype grid; the interval is where
// chi^2 <= chi^2_min + 1 around it (68% for one parameter: Avni 1976, ApJ 210, 642). The spectral code is
// that minimum rounded to the nearest half subtype, as literature types are quoted: each names the nearest
// spectral standard, so the boundary between T9.5 and Y0 lies at 89.75, not at 90.0 as floor() of the
// unrounded code would put it (common practice, no source). Teff and mass use the unrounded minimum.
#include "photometry/DwarfLocus.h"

#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

namespace starcensus::photometry {

enum class MatchBand : std::uint8_t { B, V, J, H, Ks, W1, W2 };
inline constexpr std::size_t kMatchBandCount = 7;

/// Absolute magnitudes and their errors (mag) of one object; NaN = band missing (magnitude) or error
/// unknown (BandMatchSettings::missing_error_mag is used).
struct BandMatchInput {
    std::array<double, kMatchBandCount> abs_mag;
    std::array<double, kMatchBandCount> error_mag;
    double modulus_error_mag = 0.0; // common to every absolute magnitude
    BandMatchInput() {
        abs_mag.fill(std::numeric_limits<double>::quiet_NaN());
        error_mag.fill(std::numeric_limits<double>::quiet_NaN());
    }
    double& operator[](MatchBand band) { return abs_mag[static_cast<std::size_t>(band)]; }
    double operator[](MatchBand band) const { return abs_mag[static_cast<std::size_t>(band)]; }
    /// Number of bands with a magnitude.
    int bandCount() const;
};

struct BandMatchResult {
    double grid_code = std::numeric_limits<double>::quiet_NaN();     // the chi^2 minimum on the grid
    double spectral_code = std::numeric_limits<double>::quiet_NaN(); // grid_code to the nearest half subtype
    double chi_squared = std::numeric_limits<double>::quiet_NaN();   // at spectral_code
    double code_low = std::numeric_limits<double>::quiet_NaN();      // chi^2 <= minimum + 1 from here...
    double code_high = std::numeric_limits<double>::quiet_NaN();     // ...to here
    int bands = 0; // bands with a magnitude that the relations reach at spectral_code
};

/// Scatter of the relations (mag) by range of spectral code; a type's colours scatter less than its
/// luminosity.
struct BandMatchSettings {
    /// Per-band colour scatter: O-K dwarfs (code < 60), M dwarfs (60-70), L, T and Y dwarfs. The locus
    /// colours of stars are sequences of means with rms of a few hundredths of a magnitude; M and later
    /// dwarfs spread more (J-Ks by ~0.2 mag among L dwarfs of one subtype; W1-W2 by up to ~0.5 mag among Y
    /// dwarfs; all from memory).
    double colour_scatter_star_mag = 0.05;
    double colour_scatter_m_mag = 0.1;
    double colour_scatter_ultracool_mag = 0.2;
    /// Common luminosity scatter: 0.4 mag, the rms of Dupuy & Liu 2012's M6-T9 fits (0.35-0.43 mag), used
    /// for every type earlier than Y (for stars, a main-sequence width of that order is common practice,
    /// no source); Y dwarfs 0.5 mag (from memory).
    double luminosity_scatter_mag = 0.4;
    double luminosity_scatter_y_mag = 0.5;
    /// Error assumed for a band quoted without one (common practice, no source).
    double missing_error_mag = 0.05;
};

/// The W1/W2 relations beyond M6V (data/ultracool_wise_absolute_magnitudes.txt), by spectral code.
struct UltracoolWiseRelations {
    std::vector<double> spectral_code;
    std::vector<double> abs_w1_mag;
    std::vector<double> abs_w2_mag;
    /// Reads the shipped table; throws InputError naming the file if missing or malformed.
    static UltracoolWiseRelations load(const std::string& path);
    static const UltracoolWiseRelations& shipped();
};

class BandMatcher {
  public:
    BandMatcher(const DwarfLocus& locus, const UltracoolWiseRelations& wise, BandMatchSettings settings = {});
    static const BandMatcher& shipped();

    /// The best-matching code; spectral_code NaN when no band is present.
    BandMatchResult match(const BandMatchInput& input) const;
    /// The relation M_b(code) (mag) at a grid code; NaN where no relation reaches it.
    double relationAbsMag(MatchBand band, double spectral_code) const;
    const BandMatchSettings& settings() const { return settings_; }

  private:
    std::size_t gridIndex(double spectral_code) const;
    double gridCode(std::size_t index) const;

    BandMatchSettings settings_;
    double first_code_ = 0.0;
    std::vector<std::array<double, kMatchBandCount>> relation_abs_mag_; // per grid code (0.1-subtype steps)
    std::vector<std::uint8_t> colour_regime_;      // per grid code: 0 O-K, 1 M, 2 L-Y (BandMatchSettings)
    std::vector<double> luminosity_variance_mag2_; // per grid code
};

} // namespace starcensus::photometry
