#pragma once
// White-dwarf cooling sequences from the Montreal synthetic photometry tables (Bergeron group; Holberg &
// Bergeron 2006, AJ 132, 1221; Tremblay et al. 2011, ApJ 730, 128; Bedard et al. 2020, ApJ 901, 93;
// citation list from memory), shipped in data/white_dwarf_montreal_{da,db}.txt: pure-hydrogen (DA) and
// pure-helium (DB) MODELS on a grid of 5 log g (7.0-9.0) x 61 (DA) or 72 (DB) Teff, absolute Gaia EDR3
// magnitudes, mass and cooling age. Also the white-dwarf / main-sequence boundary the classifier uses.
#include "photometry/Curve.h"

#include <algorithm>
#include <array>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

namespace starcensus::photometry {

class DwarfLocus;

enum class WhiteDwarfAtmosphere : std::uint8_t {
    Hydrogen, // DA
    Helium,   // DB
};

/// One model of the grid.
struct WhiteDwarfModel {
    double teff_k;
    double log_g; // log10 of surface gravity in cm s^-2
    double mass_msun;
    double abs_g_mag;  // absolute Gaia EDR3 G
    double abs_bp_mag; // absolute Gaia EDR3 G_BP
    double abs_rp_mag; // absolute Gaia EDR3 G_RP
    double cooling_age_yr;
};

/// Interpolated properties; all NaN outside the grid.
struct WhiteDwarfPhotometry {
    double abs_g_mag;
    double abs_bp_mag;
    double abs_rp_mag;
    double bp_rp_mag;
    double mass_msun;
    double cooling_age_yr;
};

/// Parameters of a white dwarf read off the model grid at its colour and absolute magnitude.
struct WhiteDwarfParameters {
    double teff_k;
    double log_g;
    double mass_msun;
    bool inside_grid; // false: M_G beyond the grid's log g range at that colour (log g clamped)
};

namespace detail {
struct WhiteDwarfGrid;
}

class WhiteDwarfSequence {
  public:
    /// Reads both tables; throws InputError naming the file on a missing or malformed table.
    static WhiteDwarfSequence load(const std::string& hydrogen_path, const std::string& helium_path);
    /// The tables in data/, loaded once.
    static const WhiteDwarfSequence& shipped();

    /// Models in any order; each atmosphere needs at least two log g, each with at least two Teff
    /// (throws InputError otherwise).
    WhiteDwarfSequence(std::vector<WhiteDwarfModel> hydrogen, std::vector<WhiteDwarfModel> helium);

    /// The models of one atmosphere, sorted by log g then Teff.
    const std::vector<WhiteDwarfModel>& models(WhiteDwarfAtmosphere atmosphere) const;

    /// Photometry, mass and cooling age at (Teff, log g): at each of the two bracketing grid log g,
    /// linear in log10 Teff between grid Teff (cooling age linear in log10 age, or in age next to a
    /// zero-age model), then linear in log g.
    WhiteDwarfPhotometry atTeff(double teff_k, double log_g, WhiteDwarfAtmosphere atmosphere) const;

    /// Teff at a cooling age: at each bracketing grid log g the exact inverse of atTeff's age
    /// interpolation (age falls monotonically with Teff in both tables), then log10 Teff linear in log g.
    /// At age 0 the coolest zero-age model's Teff (the hottest models all have age 0). NaN for negative
    /// ages, ages older than the coolest model, or younger than a hottest model whose age is positive, at
    /// either bracketing log g.
    double teffAtCoolingAge(double cooling_age_yr, double log_g, WhiteDwarfAtmosphere atmosphere) const;

    /// Teff, log g and mass of an object at (BP-RP, M_G): on each log g track, Teff where the track's
    /// BP-RP equals the object's (linear in log10 Teff, over the part of the track hotter than its reddest
    /// model, where colour is single-valued), then linear in M_G between the two tracks that bracket the
    /// object's M_G. NaN Teff outside the tracks' colour range.
    WhiteDwarfParameters fromColourMagnitude(double bp_rp_mag, double abs_g_mag,
                                             WhiteDwarfAtmosphere atmosphere) const;

    /// atTeff(teffAtCoolingAge(...)); the simulator's age -> photometry.
    WhiteDwarfPhotometry atCoolingAge(double cooling_age_yr, double log_g,
                                      WhiteDwarfAtmosphere atmosphere) const;

  private:
    std::array<std::shared_ptr<const detail::WhiteDwarfGrid>, 2> grids_;
};

/// Where the white-dwarf region of the (BP-RP, M_G) diagram begins.
struct WhiteDwarfBoundarySettings {
    double log_g = 7.0;                        // the brightest (lowest-gravity) tabulated cooling sequences
    double fraction_toward_white_dwarfs = 0.5; // 0 = on the dwarf locus, 1 = on the cooling sequence
    double bp_rp_min_mag = -1.0;               // colour range tabulated (mag); clamped outside
    double bp_rp_max_mag = 7.0;
    double bp_rp_step_mag = 0.01;
};

/// M_G of the boundary as a function of BP-RP: the fraction `fraction_toward_white_dwarfs` of the way
/// from the dwarf locus M_G to the brighter of the DA and DB cooling sequences at the settings' log g
/// (0.5 = midway; common practice, no source). The cooling sequences are used on their hot-to-reddest
/// branch (the coolest models turn blue again). Bluer than the bluest locus colour (B9V, BP-RP -0.12)
/// the locus M_G is held at that row's value; redder than the reddest model colour (BP-RP ~1.8) the
/// boundary runs parallel to the locus at the offset it has there. Objects fainter than the boundary
/// are white-dwarf candidates.
class WhiteDwarfBoundary {
  public:
    WhiteDwarfBoundary(const DwarfLocus& locus, const WhiteDwarfSequence& white_dwarfs,
                       const WhiteDwarfBoundarySettings& settings = {});

    /// Boundary M_G (mag) at a BP-RP colour (mag), interpolated on the settings' colour grid.
    double absGMag(double bp_rp_mag) const {
        return curve_.at(std::clamp(bp_rp_mag, curve_.x.front(), curve_.x.back()));
    }

  private:
    detail::Curve curve_;
};

} // namespace starcensus::photometry
