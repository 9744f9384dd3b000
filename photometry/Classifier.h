#pragma once
// Spectral class from the colour-absolute-magnitude diagram: Gaia M_G against BP-RP, measured against
// the Pecaut & Mamajek dwarf locus (photometry/DwarfLocus.h) and the Montreal white-dwarf cooling
// sequences (photometry/WhiteDwarfSequence.h), with the 2MASS near infrared (M_J, J-Ks) for brown
// dwarfs. The exact classifier is Classifier::classifyAbsolute(); ClassGrid (photometry/ClassGrid.h)
// tabulates it once for the Monte Carlo, where a lookup costs a few nanoseconds.
//
// Regions, in the order they are decided (thresholds in ClassifierSettings):
//  1. No M_G (no G, or no valid distance) and no bands for step 6: unclassified, NoAbsoluteMagnitude.
//  2. White dwarf: BP-RP <= white_dwarf_max_bp_rp_mag and M_G fainter than WhiteDwarfBoundary
//     (midway between the locus and the log g 7.0 DA/DB cooling sequences).
//  3. Spectral code: from BP-RP on the locus; where BP-RP saturates (redder than
//     saturated_bp_rp_mag, ~M6.5V) the later of the colour code and the M_G code (M_G keeps falling
//     through late M and L while BP-RP turns over). Bluer than the locus (BP-RP < -0.12, B9V) the code
//     comes from M_G and the object is flagged OutsideLocus.
//  4. Offset = M_G - M_G(locus at the object's colour); negative = brighter than the locus.
//     offset < -evolved_offset_mag (-evolved_offset_red_mag redder than evolved_red_bp_rp_mag): evolved
//     (subgiant/giant). Between that and -binary_band_mag: main sequence, flagged AboveBinaryBand. offset >
//     subluminous_offset_mag: main sequence, flagged BelowLocus (subdwarf candidate). Otherwise main sequence
//     of the code's letter.
//  5. Late objects (code L0 or later, M_G fainter than late_type_abs_g_mag, or no optical colour) with
//     M_J and J-Ks: the nearest point of the M/L/T/Y locus in (J-Ks, M_J), flagged NearInfrared.
//  6. Without BP-RP and either without G or with Johnson B or V (bright stars that saturate Gaia,
//     compilations without Gaia colours, infrared-only brown dwarfs), when two of B, V, J, H, Ks, W1, W2
//     (or J alone) are present: with V and Ks, the white-dwarf and evolved decisions of (V-Ks, M_V) against
//     the locus's V-Ks and M_V (a white dwarf more than white_dwarf_v_offset_mag below the locus, evolved
//     by the M_V offset, the red evolved threshold at the locus V-Ks of evolved_red_bp_rp_mag, bluer than
//     the locus: unclassified). Otherwise the dwarf code is the best match over every band present
//     (photometry/BandMatch.h; flag BandMatch, with JohnsonColour when B or V took part and NearInfrared
//     when only J, H, Ks, W1, W2 did); binary band / below the locus by the M_V offset at that code. A
//     match whose chi^2 exceeds max_match_chi_squared_per_band per band, also after leaving out one band or
//     one survey's bands (flag BandLeftOut), is unclassified (OutsideLocus).
//  7. Without BP-RP, with G and without Johnson bands: the code from M_G alone (flag NoColour, lower
//     confidence); if G-RP is present and more than g_rp_tolerance_mag bluer than the locus G-RP at that
//     code, unclassified, OutsideLocus.
//     Fainter than the locus's faintest M_G (L8V) and red in G-RP or G-J: T dwarf (OutsideLocus).
#include "photometry/BandMatch.h"
#include "photometry/DwarfLocus.h"
#include "photometry/StellarClass.h"
#include "photometry/WhiteDwarfSequence.h"
#include "photometry/catalog/CatalogRow.h"

#include <cmath>
#include <cstdint>
#include <limits>
#include <span>
#include <vector>

namespace starcensus::photometry {

/// Bit flags of a classification (combine with |, test with hasFlag()).
enum class ClassificationFlag : std::uint16_t {
    NoAbsoluteMagnitude = 1u << 0, // G missing, or parallax missing / not positive
    NoColour = 1u << 1,            // BP or RP missing: class from M_G alone, lower confidence
    OutsideLocus = 1u << 2,        // colour or magnitude beyond the tabulated locus
    AboveBinaryBand = 1u << 3,     // brighter than the binary band but not enough to call evolved
    BelowLocus = 1u << 4,          // fainter than the locus by more than subluminous_offset_mag
    NearInfrared = 1u << 5,        // class and code from M_J and J-Ks
    LowParallaxSnr = 1u << 6,      // parallax / error below min_parallax_snr
    NoUsableBand = 1u << 7,        // none of G, J, or two of B V H Ks W1 W2: nothing to place
    LiteratureType = 1u << 8,      // class and code from the catalogue's spectral type (census, not here)
    JohnsonColour = 1u << 9,       // class or code from Johnson B/V with other bands (no BP-RP)
    BandMatch = 1u << 10,          // code from the best match over B, V, J, H, Ks, W1, W2 (no BP-RP)
    BandLeftOut = 1u << 11,        // the match left out the one band that disagreed with the rest
};
constexpr std::uint16_t flagBit(ClassificationFlag flag) {
    return static_cast<std::uint16_t>(flag);
}
constexpr bool hasFlag(std::uint16_t flags, ClassificationFlag flag) {
    return (flags & flagBit(flag)) != 0;
}

/// All numeric thresholds of the classifier. Magnitudes and colours in mag (Gaia DR2/DR3 Vega system).
struct ClassifierSettings {
    /// Unresolved binaries sit up to 2.5 log10(2) = 0.75 mag above the locus (equal-mass pair).
    double binary_band_mag = 0.75;
    /// More than this above the locus: evolved (subgiants and giants; common practice, no source).
    double evolved_offset_mag = 1.0;
    /// Redder than evolved_red_bp_rp_mag (about M0V) the threshold is evolved_offset_red_mag instead:
    /// stars that red have main-sequence lifetimes longer than the Galaxy's age, so nothing evolved lies
    /// just above their locus (red giants of that colour are ~8 mag brighter); what does lie 1-2 mag
    /// above it is higher-order multiples, young stars and blended photometry (CARMENES M dwarfs: 176
    /// of 2343 would be "evolved" with the 1-mag rule, nearly all known or candidate multiples).
    double evolved_red_bp_rp_mag = 1.8;
    double evolved_offset_red_mag = 2.0;
    /// More than this below the locus (but above the white-dwarf boundary): flag BelowLocus.
    double subluminous_offset_mag = 1.0;
    /// Redder than this BP-RP the locus colour changes by <0.15 mag per subtype and turns over
    /// (M6.5V 4.50 to M9.5V 4.86, peak 5.10 at M8.5V; Pecaut & Mamajek table), so M_G sets the code.
    double saturated_bp_rp_mag = 4.5;
    /// White dwarfs are only looked for bluer than this; the reddest Montreal models (3250 K DB) have
    /// BP-RP 1.78-1.85.
    double white_dwarf_max_bp_rp_mag = 2.0;
    /// Objects fainter than this M_G (about M7.5V) use the near infrared when they have it.
    double late_type_abs_g_mag = 15.0;
    /// Scales of the near-infrared distance to the locus: d^2 = (dJKs/colour)^2 + (dM_J/magnitude)^2;
    /// beyond nir_max_distance the object is unclassified (OutsideLocus).
    double nir_colour_scale_mag = 0.2;
    double nir_magnitude_scale_mag = 0.5;
    double nir_max_distance = 3.0;
    /// W1-W2 scale of the mid-infrared distance (objects without J-Ks), wider than J-Ks's: W1-W2 spreads by
    /// about half a magnitude among Y dwarfs of one subtype and W1 is often an upper limit (common practice,
    /// no source). M_J uses nir_magnitude_scale_mag, and the limit is nir_max_distance.
    double mir_colour_scale_mag = 0.5;
    /// Without BP-RP: a G-RP bluer than the locus at the M_G code by more than this is unclassified.
    double g_rp_tolerance_mag = 0.3;
    /// Without BP-RP and fainter than the locus's faintest M_G (L8V, 20.0): a T dwarf if G-RP or G-J is
    /// redder than these. The locus has G-RP 1.87 and G-J 5.35 at L8V; the coolest Montreal white dwarfs
    /// (1500 K) have G-RP of -0.5 to 0 and warmer ones G-J below ~1.5, so the cuts sit well apart.
    double t_dwarf_min_g_rp_mag = 1.2;
    double t_dwarf_min_g_j_mag = 3.0;
    /// With V-Ks instead of BP-RP: more than this below the locus M_V at the object's V-Ks is a white
    /// dwarf. The Montreal DA grid (Bergeron group table of 13 Jan 2021, the source of data/'s white-dwarf
    /// table; log g 7.0-9.0, 1500-150000 K) lies 8.1 mag or more below it in V-Ks (measured over the
    /// table's V and 2MASS Ks); hot subdwarfs (~6-7 mag below, from memory) stay above.
    double white_dwarf_v_offset_mag = 7.5;
    /// Best matches (step 6) worse than this chi^2 per band present are unclassified: an average miss of
    /// 3 sigma per band (common practice, no source).
    double max_match_chi_squared_per_band = 9.0;
    /// Parallax signal-to-noise below which LowParallaxSnr is set.
    double min_parallax_snr = 5.0;
    WhiteDwarfBoundarySettings white_dwarf_boundary;
};

/// Apparent photometry and distance of one object; NaN = missing.
struct PhotometricInput {
    double g_mag = std::numeric_limits<double>::quiet_NaN();
    double bp_mag = std::numeric_limits<double>::quiet_NaN();
    double rp_mag = std::numeric_limits<double>::quiet_NaN();
    double j_mag = std::numeric_limits<double>::quiet_NaN();  // 2MASS J
    double ks_mag = std::numeric_limits<double>::quiet_NaN(); // 2MASS Ks
    double v_mag = std::numeric_limits<double>::quiet_NaN();  // Johnson V
    double w1_mag = std::numeric_limits<double>::quiet_NaN(); // WISE W1
    double w2_mag = std::numeric_limits<double>::quiet_NaN(); // WISE W2
    double b_mag = std::numeric_limits<double>::quiet_NaN();  // Johnson B
    double h_mag = std::numeric_limits<double>::quiet_NaN();  // 2MASS H
    /// Errors of the bands of the best match (step 6), mag; NaN = not quoted.
    double b_error_mag = std::numeric_limits<double>::quiet_NaN();
    double v_error_mag = std::numeric_limits<double>::quiet_NaN();
    double j_error_mag = std::numeric_limits<double>::quiet_NaN();
    double h_error_mag = std::numeric_limits<double>::quiet_NaN();
    double ks_error_mag = std::numeric_limits<double>::quiet_NaN();
    double w1_error_mag = std::numeric_limits<double>::quiet_NaN();
    double w2_error_mag = std::numeric_limits<double>::quiet_NaN();
    /// Used when not NaN; otherwise the distance modulus comes from the parallax.
    double distance_modulus_mag = std::numeric_limits<double>::quiet_NaN();
    double parallax_mas = std::numeric_limits<double>::quiet_NaN();
    double parallax_error_mas = std::numeric_limits<double>::quiet_NaN();
};

/// The photometry and parallax of a catalogue row (distance from the parallax).
PhotometricInput photometricInput(const CatalogRow& row);

/// True when the input has a band the classifier can place: G, J, or two of B, V, H, Ks, W1, W2. Without one
/// the classification is flagged NoUsableBand (the census's "no photometry").
bool hasClassifiableBands(const PhotometricInput& input);

struct AbsoluteMagnitude {
    double mag;
    double error_mag;
};

/// M = m + 5 log10(parallax_mas) - 10, error 5/ln(10) * parallax_error/parallax (first-order
/// propagation; ignores the bias of inverting noisy parallaxes). NaN for parallax <= 0 or NaN.
AbsoluteMagnitude absoluteMagnitude(double apparent_mag, double parallax_mas, double parallax_error_mas);

struct Classification {
    StellarClass stellar_class = StellarClass::Unclassified;
    double spectral_code = std::numeric_limits<double>::quiet_NaN();    // dwarf-equivalent subtype code
    double teff_k = std::numeric_limits<double>::quiet_NaN();           // locus Teff at the code
    double mass_msun = std::numeric_limits<double>::quiet_NaN();        // locus mass at the code
    double locus_offset_mag = std::numeric_limits<double>::quiet_NaN(); // M_G - locus M_G at the colour
    double abs_g_mag = std::numeric_limits<double>::quiet_NaN();
    double abs_g_error_mag = std::numeric_limits<double>::quiet_NaN();
    double bp_rp_mag = std::numeric_limits<double>::quiet_NaN();
    double g_rp_mag = std::numeric_limits<double>::quiet_NaN();
    double j_ks_mag = std::numeric_limits<double>::quiet_NaN();
    /// The best match's chi^2 and its code interval (chi^2 <= minimum + 1) where it named the code (flag
    /// BandMatch); NaN otherwise.
    double match_chi_squared = std::numeric_limits<double>::quiet_NaN();
    double code_low = std::numeric_limits<double>::quiet_NaN();
    double code_high = std::numeric_limits<double>::quiet_NaN();
    std::uint16_t flags = 0;
};

/// Absolute photometry of one object for Classifier::classifyAbsolute(); NaN = missing.
struct AbsolutePhotometry {
    double abs_g_mag = std::numeric_limits<double>::quiet_NaN();
    double bp_rp_mag = std::numeric_limits<double>::quiet_NaN();
    double g_rp_mag = std::numeric_limits<double>::quiet_NaN();
    double w1_w2_mag = std::numeric_limits<double>::quiet_NaN(); // the mid-infrared path's colour
    BandMatchInput bands; // absolute B, V, J, H, Ks, W1, W2, their errors, the modulus error
};

/// The census category of a classification: its class and code, or for an unclassified object the
/// category of its reason (LowParallaxSnr, then NoUsableBand, otherwise outside every locus).
Category censusCategory(const Classification& result);

class Classifier {
  public:
    Classifier(const DwarfLocus& locus, const WhiteDwarfSequence& white_dwarfs,
               const BandMatcher& band_matcher, ClassifierSettings settings = {});
    /// On the shipped tables with default settings, built once.
    static const Classifier& shipped();

    const ClassifierSettings& settings() const { return settings_; }
    const DwarfLocus& locus() const { return locus_; }

    /// From apparent magnitudes and a distance (modulus or parallax).
    Classification classify(const PhotometricInput& input) const;
    /// categories[k] = censusCategory(classify(input)) with input.distance_modulus_mag = moduli[k] (mag): one
    /// star's category at many distances, without the Teff, mass and white-dwarf parameters the category
    /// does not depend on, and with the input's bands gathered once. moduli and categories have one size.
    void censusCategoriesAt(PhotometricInput input, std::span<const float> moduli,
                            std::span<Category> categories) const;
    /// From absolute magnitudes and colours (any may be NaN).
    Classification classifyAbsolute(const AbsolutePhotometry& photometry) const;
    /// The same from absolute M_G, colours, near and mid infrared, Johnson M_V and V-Ks: M_Ks is
    /// M_J - (J-Ks), or without it M_V - (V-Ks); errors unknown.
    Classification classifyAbsolute(double abs_g_mag, double bp_rp_mag, double g_rp_mag = kNaN,
                                    double abs_j_mag = kNaN, double j_ks_mag = kNaN, double w1_w2_mag = kNaN,
                                    double abs_v_mag = kNaN, double v_ks_mag = kNaN) const;
    /// classifyAbsolute()'s class, subtype code and flags without Teff and mass (left NaN) and without
    /// the white-dwarf grid's OutsideLocus flag: what the class grid needs for each cell it classifies.
    Classification classifyClassOnly(double abs_g_mag, double bp_rp_mag) const;

  private:
    static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    /// An input's absolute photometry at its distance, the modulus error (mag) and the flags of the
    /// distance and the bands (LowParallaxSnr, NoUsableBand).
    struct PlacedPhotometry {
        AbsolutePhotometry photometry;
        double modulus_error_mag = 0.0;
        std::uint16_t flags = 0;
    };
    PlacedPhotometry place(const PhotometricInput& input) const;
    /// What classifyWithColour() reads of the locus and the white-dwarf boundary at a BP-RP colour alone,
    /// found once for the many distances of censusCategoriesAt(). NaN members where the colour is NaN, and
    /// the boundary's where the colour is too red for a white dwarf.
    struct ColourTerms {
        double colour_code = kNaN;                // the locus code at the colour clamped onto the locus
        double locus_abs_g_mag = kNaN;            // the locus M_G at that code
        double white_dwarf_boundary_abs_g = kNaN; // the boundary's M_G at the colour
    };
    ColourTerms colourTerms(double bp_rp_mag) const;
    /// Class, subtype code and flags; Teff and mass are added by classifyAbsolute(). `colour` must be
    /// colourTerms(photometry.bp_rp_mag).
    Classification classOf(const AbsolutePhotometry& photometry, const ColourTerms& colour) const;
    /// Step 6 applies: no BP-RP, G absent or a Johnson band present, and bands for a match.
    static bool usesBandMatch(const AbsolutePhotometry& photometry);
    /// Step 6.
    void classifyWithBandMatch(Classification& result, const BandMatchInput& bands) const;
    /// Step 6's white-dwarf and evolved decisions from (V-Ks, M_V); true when one was made (or the colour is
    /// bluer than the locus), false for a dwarf or when V or Ks is missing or V-Ks is redder than the locus.
    bool decideFromJohnsonColour(Classification& result, double abs_v_mag, double v_ks_mag) const;
    void classifyWithColour(Classification& result, const ColourTerms& terms) const;
    void classifyWithoutColour(Classification& result, double abs_j_mag) const;
    /// Step 5: the J-Ks path, or without J-Ks the mid-infrared one.
    void classifyNearInfrared(Classification& result, double abs_j_mag, double j_ks_mag,
                              double w1_w2_mag) const;
    void classifyMidInfrared(Classification& result, double abs_j_mag, double w1_w2_mag) const;
    /// The infrared paths' verdict: the nearest point's code if within nir_max_distance (scaled units).
    void acceptInfraredMatch(Classification& result, double distance_squared, double spectral_code) const;
    void setDwarf(Classification& result, double spectral_code) const;
    /// How far above the locus (mag) an object of this colour must lie to be evolved: the BP-RP and the
    /// V-Ks paths share the rule, redder than about M0V the larger threshold (ClassifierSettings).
    double evolvedOffsetMag(bool redder_than_evolved_red_colour) const;
    /// AboveBinaryBand or BelowLocus for a main-sequence object's offset from the locus (mag), or 0.
    std::uint16_t mainSequenceOffsetFlags(double offset_mag) const;

    const DwarfLocus& locus_;
    const WhiteDwarfSequence& white_dwarfs_;
    const BandMatcher& band_matcher_;
    ClassifierSettings settings_;
    WhiteDwarfBoundary white_dwarf_boundary_;
    std::array<double, 2> locus_bp_rp_range_mag_;
    std::array<double, 2> locus_abs_g_range_mag_;
    std::array<double, 2> locus_v_ks_range_mag_;
    double evolved_red_v_ks_mag_; // the locus V-Ks where BP-RP is settings_.evolved_red_bp_rp_mag
    struct NearInfraredPoint {
        double scaled_abs_j, scaled_j_ks, spectral_code; // M_J and J-Ks divided by their scales
    };
    // M0V onward in 0.1-subtype steps, sorted by scaled M_J so the nearest-point search can stop once the
    // M_J difference alone exceeds the best distance.
    std::vector<NearInfraredPoint> near_infrared_locus_;
    struct MidInfraredPoint {
        double scaled_abs_j, scaled_w1_w2, spectral_code; // M_J (NaN where the locus has none), W1-W2
    };
    std::vector<MidInfraredPoint>
        mid_infrared_locus_; // M0V onward in 0.1-subtype steps, where W1-W2 is known
};

} // namespace starcensus::photometry
