#pragma once
// Band magnitudes of model stars, behind one small interface: the dwarf locus (main sequence, brown
// dwarfs, giants' colour-colour relations), the white-dwarf cooling sequences and a brown-dwarf cooling
// law. Shared by the luminosity-function model (census/MassFunctionFit.h), the completeness ranges
// (census/Completeness.h) and the mock simulator (census/mock/); ShippedModelPhotometry uses the
// reference tables in data/, and tests may substitute their own.
#include "photometry/Curve.h"
#include "photometry/WhiteDwarfSequence.h"

#include <limits>

namespace starcensus::photometry {

class DwarfLocus;

/// Absolute magnitudes (mag) in the catalogued bands; NaN where the model has none.
struct BandMagnitudes {
    double g;                                             // Gaia G
    double bp;                                            // Gaia G_BP
    double rp;                                            // Gaia G_RP
    double j;                                             // 2MASS J
    double h;                                             // 2MASS H
    double ks;                                            // 2MASS Ks
    double b = std::numeric_limits<double>::quiet_NaN();  // Johnson B
    double v = std::numeric_limits<double>::quiet_NaN();  // Johnson V
    double w1 = std::numeric_limits<double>::quiet_NaN(); // WISE W1 (3.4 um)
    double w2 = std::numeric_limits<double>::quiet_NaN(); // WISE W2 (4.6 um)
};

class ModelPhotometry {
  public:
    virtual ~ModelPhotometry() = default;
    /// Spectral code (photometry/StellarClass.h) of a main-sequence star of this mass (Msun).
    virtual double codeOfMass(double mass_msun) const = 0;
    /// Spectral code of a dwarf or brown dwarf of this effective temperature (K).
    virtual double codeOfTeff(double teff_k) const = 0;
    /// Spectral code of the dwarf with this BP-RP colour (mag).
    virtual double codeOfBpRp(double bp_rp_mag) const = 0;
    /// Absolute magnitudes of the mean dwarf of a spectral code.
    virtual BandMagnitudes dwarf(double spectral_code) const = 0;
    /// Absolute magnitudes of a white dwarf of a cooling age (yr), log g (cgs) and atmosphere.
    virtual BandMagnitudes whiteDwarf(double cooling_age_yr, double log_g,
                                      WhiteDwarfAtmosphere atmosphere) const = 0;
};

/// M_H where a model gives only J and Ks: H - Ks = 0.3 (J - Ks), a rough fit by eye to the J-H and
/// H-Ks columns of the Pecaut & Mamajek dwarf table for K5V-L5V, where (H-Ks)/(J-Ks) runs 0.19-0.40.
double absHFromJKs(double abs_j_mag, double abs_ks_mag);

/// The models from the shipped tables (DwarfLocus::shipped(), WhiteDwarfSequence::shipped()).
///  - Types earlier than the first tabulated M_G (B3V): M_G = M_V, as the table itself has G = V within
///    0.01 mag for B3V-B8V; colours bluer than the first tabulated BP-RP and G-RP (B9V) are held there.
///  - Types later than the last tabulated M_G (L8V): M_G = M_J + (G - J) at L8V (5.35 mag), held
///    constant (common practice, no source); BP and RP missing where the table has no colours.
///  - Johnson V from the table's M_V (O3V-L4V) and B from its B-V (O3V-M9.5V); NaN beyond.
///  - WISE W1 = M_Ks - (Ks - W1) and W2 = W1 - (W1 - W2) where the table has both colours (B5V-T2V).
///    Later than the last Ks - W1 row (T2V) the table has W1 - W2 but no W1: M_W2 then follows the
///    median M_W2 of each subtype T3V-Y4V among the ultracool dwarfs with a parallax and W2 in the Best
///    et al. 2021 (AJ 161, 42) UltracoolSheet compilation and the Kirkpatrick et al. 2019 (ApJS 240, 19)
///    Y dwarfs (the tests/reference copies; types rounded to the whole subtype, medians computed here:
///    T3 11.78 (3 objects), T5 12.82 (7), T8 13.53 (81), Y0 14.62 (41), Y1 15.36 (10), Y4 16.92 (1);
///    Y2's median, 14.37 from 3 objects, brighter than Y1's, is not used: Y2 lies between Y1 and Y4),
///    linear between subtypes and joined linearly to the T2V row; W1 = W2 + (W1 - W2).
///  - No 2MASS, Johnson or WISE bands for white dwarfs: the shipped cooling tables carry only Gaia bands.
class ShippedModelPhotometry final : public ModelPhotometry {
  public:
    ShippedModelPhotometry();
    double codeOfMass(double mass_msun) const override;
    double codeOfTeff(double teff_k) const override;
    double codeOfBpRp(double bp_rp_mag) const override;
    BandMagnitudes dwarf(double spectral_code) const override;
    BandMagnitudes whiteDwarf(double cooling_age_yr, double log_g,
                              WhiteDwarfAtmosphere atmosphere) const override;

  private:
    const DwarfLocus& locus_;
    const WhiteDwarfSequence& white_dwarfs_;
    double first_g_code_;       // earliest type with a tabulated M_G
    double first_colour_code_;  // earliest type with a tabulated BP-RP
    double first_g_rp_code_;    // earliest type with a tabulated G-RP
    double late_g_minus_j_mag_; // G - J at the latest type with a tabulated M_G
    double last_ks_w1_code_;    // latest type with a tabulated Ks - W1 (T2V)
    detail::Curve late_abs_w2_; // M_W2 against code from last_ks_w1_code_ on
};

/// Brown-dwarf Teff (K) of the Burrows et al. 2001 approximation (from memory), unclamped:
/// Teff = 1550 K (M / 0.05 Msun)^0.83 (t / Gyr)^-0.32.
double brownDwarfTeffK(double mass_msun, double age_gyr);

/// One ShippedModelPhotometry for the process (tables loaded on first use).
const ModelPhotometry& shippedModelPhotometry();

} // namespace starcensus::photometry
