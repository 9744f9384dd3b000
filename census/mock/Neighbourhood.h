#pragma once
// A mock solar neighbourhood with known truth: stellar systems inside a sphere around the Sun, their
// masses, ages and evolutionary stages, unresolved binaries, absolute and apparent photometry, and a
// catalog of what a Gaia + 2MASS-like survey would measure. Numerics only, no I/O (see Output.h).
//
// Laws (defaults in MockSettings; sources beside each field):
//  - Systems form a Poisson process of uniform density: they are generated in order of increasing
//    distance from exponential gaps in enclosed volume, which makes the count inside every radius
//    exactly Poisson and lets a large mock be produced in bounded memory, chunk by chunk.
//  - Primary masses from the IMF (InitialMassFunction.h); ages uniform in [0, disc age] (constant
//    star-formation rate).
//  - Main-sequence lifetime t_MS = t_sun (M/Msun)^-2.5. Age < t_MS: main sequence (mass -> spectral code
//    -> dwarf locus); t_MS..(1 + giant share) t_MS: giant near the red clump; later: white dwarf with
//    cooling age = age - (1 + giant share) t_MS, or an NS/BH (initial mass > 8 Msun), which is removed.
//  - Brown dwarfs (mass < 0.075 Msun) cool: Teff = 1550 K (M/0.05 Msun)^0.83 (t/Gyr)^-0.32 (Burrows et
//    al. 2001, Rev. Mod. Phys. 73, 719; from memory), clamped to the settings' range; Teff -> code ->
//    dwarf locus (L/T/Y).
//  - Unresolved binaries: companion mass q * M1 with q uniform in [mass_min / M1, 1]; same age and
//    distance; fluxes added per band. The object keeps the class of the component that is brighter in
//    G (the one a photometric census can classify); the other is its companion.
//  - Resolved companions: a share of the systems draws one outer companion (a share of those two: a
//    triple), mass ratio as above, semi-major axis log-normal from the period distribution of Raghavan et
//    al. 2010 (ApJS 190, 1, Sect. 7.1: log P/d ~ N(5.03, 2.28); from memory) through Kepler's third law
//    for the system mass, circular orbit at an isotropic orientation and phase. A companion that would
//    appear closer than the resolution limit is not added (unresolved companions are the binaries above).
//    The companion moves with the primary's tangential velocity plus its orbital velocity; it is its own
//    object, with its own measurement errors.
//  - Measurement errors from MeasurementErrors.h, Gaussian in flux for the Gaia bands and in magnitude for
//    2MASS; an object is catalogued if its measured G is at most the survey limit and not brighter than
//    its bright limit (saturation).
//  - Optionally (CompanionSettings) a second catalogue of what that survey misses, as a literature
//    compilation would list it, with no Gaia source_id and positions at its own epoch: (a) ultracool
//    dwarfs (late L, T, Y) detected by a WISE-like survey in W2, with W1 where detected, J/H/Ks from
//    2MASS and deeper follow-up, parallaxes of ground-based and Spitzer programmes and, for a share of
//    them, a literature spectral type; the ones the Gaia-like survey also sees make the two files overlap;
//    (b) stars brighter than the bright limit with Johnson B/V, saturated 2MASS J/H/Ks and
//    Hipparcos-like astrometry. Its measurements draw from a stream of their own per object, so the
//    Gaia-like catalogue is the same with or without it.
#include "census/InitialMassFunction.h"
#include "census/Random.h"
#include "photometry/ModelPhotometry.h"
#include "photometry/StellarClass.h"
#include "photometry/catalog/CatalogRow.h"

#include <array>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

namespace starcensus::census::mock {

/// The companion catalogue (laws in the header comment; sources beside each field).
struct CompanionSettings {
    bool enabled = false;
    // Epoch of the positions (Julian year): compilations give positions at J2000.0, as SIMBAD does (from
    // memory); the Hipparcos-like astrometry of the bright stars, measured around 1991.25, and the
    // ultracool dwarfs' are propagated there.
    double epoch_yr = 2000.0;
    // (a) Ultracool dwarfs: dwarfs and brown dwarfs of this spectral code or later (75 = L5V).
    double ultracool_min_code = 75.0;
    double w1_limit_mag = 16.9; // AllWISE-like 5-sigma limits (Vega; Cutri et al. 2013, AllWISE
    double w2_limit_mag = 16.0; // explanatory supplement; from memory): W2 decides detection
    // J, H, Ks: 2MASS where it sees them, otherwise follow-up imaging to these 10-sigma limits. The
    // Kirkpatrick et al. 2019 Y dwarfs (tests/reference copy) have MKO J to 23.5, 3 of 23 without one;
    // the H and Ks limits are from memory (follow-up in those bands is shallower).
    double followup_j_limit_mag = 23.5;
    double followup_h_limit_mag = 22.0;
    double followup_ks_limit_mag = 21.5;
    // Parallax error (mas): this at W2 <= 13, growing 0.2 dex per magnitude fainter, at most 10 (ground-based
    // and Spitzer programmes: Kirkpatrick et al. 2019, ApJS 240, 19, 2-8 mas for Y dwarfs; Best et al.
    // 2020, AJ 159, 257, 1-5 mas; from memory). The proper-motion error (mas/yr) is the same number.
    double ultracool_parallax_error_mas = 1.5;
    double ultracool_position_error_arcsec = 0.1; // per axis (from memory)
    double spectral_type_share = 0.7; // objects listed with a spectral type (common practice, no source)
    // (b) Bright stars: true G brighter than MockSettings::g_bright_limit_mag.
    double hipparcos_parallax_error_mas = 0.5;  // van Leeuwen 2007, A&A 474, 653: 0.2-0.5 mas at V < 5
    double hipparcos_pm_error_mas_per_yr = 0.5; // (from memory)
    double johnson_error_mag = 0.01;            // photoelectric UBV (from memory)
    // 2MASS saturates: brighter than this the bands come from the short "Read 1" frames with errors of
    // bright_two_mass_error_mag (Skrutskie et al. 2006, AJ 131, 1163; from memory).
    double two_mass_saturation_mag = 4.5;
    double bright_two_mass_error_mag = 0.2;
};

struct MockSettings {
    // Volume and kinematics.
    double radius_max_pc = 25.0;         // radius of the simulated sphere (pc)
    double system_density_per_pc3 = 0.1; // stellar systems per pc^3 (common practice, no source)
    double velocity_dispersion_km_s =
        30.0; // 1-sigma tangential velocity per axis (common practice, no source)
    // Masses and ages.
    ImfSettings imf;
    double disc_age_gyr = 10.0;         // constant star formation over this time (common practice, no source)
    double ms_lifetime_sun_gyr = 10.0;  // t_MS at 1 Msun (Gyr; common practice, no source)
    double ms_lifetime_exponent = -2.5; // t_MS ∝ M^exponent (common practice, no source)
    double giant_phase_share = 0.1;     // giant phase length / t_MS (common practice, no source)
    double max_white_dwarf_progenitor_msun = 8.0; // heavier stars leave an NS/BH (common practice, no source)
    double hydrogen_burning_limit_msun = 0.075;   // brown dwarfs below (common practice, no source)
    double brown_dwarf_teff_min_k = 250.0;        // clamp of the cooling law: the coolest locus type (Y4V)
    double brown_dwarf_teff_max_k = 2900.0; // the law overshoots for young, massive brown dwarfs (~M5.5V)
    // Initial-final mass relation M_f = slope * M_i + intercept (Msun; linear approximation of Cummings
    // et al. 2018, ApJ 866, 21, from memory).
    double ifmr_slope = 0.08;
    double ifmr_intercept_msun = 0.49;
    double hydrogen_atmosphere_share = 0.8; // DA share of white dwarfs, the rest DB (from memory)
    // Binaries.
    double binary_fraction = 0.3; // unresolved binary systems / all systems (Reylé et al. 2021 find ~27%
                                  // multiplicity within 10 pc, published-figures.md section 1)
    // Resolved companions: off by default (the calibrations of the mocks' other tests count one object
    // per system); the system tests use 0.15 with a triple share of 0.2 (common practice, no source).
    double wide_companion_fraction = 0.0; // systems drawing a resolved (outer) companion
    double wide_triple_share = 0.2; // of those, systems drawing a second one (common practice, no source)
    double wide_log_period_mean_day = 5.03; // Raghavan et al. 2010, ApJS 190, 1 (from memory)
    double wide_log_period_sigma_dex = 2.28;
    double resolution_limit_arcsec = 2.0;     // companions closer are not added (Gaia DR3 resolves pairs
                                              // beyond ~1-2 arcsec, El-Badry et al. 2021; from memory)
    double wide_max_separation_au = 206265.0; // 1 pc: wider orbits are redrawn (tidal limit; from memory)
    // Intrinsic scatter (mag; common practice, no source).
    double ms_abs_mag_scatter_mag = 0.1;  // one shift of all bands of a main-sequence star or brown dwarf
    double ms_colour_scatter_mag = 0.02;  // BP-RP and J-Ks, each split equally between its two bands
    double giant_abs_g_scatter_mag = 0.3; // spread of giants around the clump relation
    double giant_bp_rp_mag = 1.2;         // mean red-clump BP-RP (from memory)
    double giant_bp_rp_scatter_mag = 0.1;
    double giant_g_ks_mag = 2.1; // mean clump G-Ks, the pivot of Ruiz-Dern et al. 2018 (A&A 609, A116)
    double giant_g_ks_scatter_mag = 0.15; // (from memory)
    // Survey.
    double g_limit_mag =
        20.7; // objects with measured G above this are not catalogued (common practice, no source)
    // Objects with measured G below this saturate and are not catalogued (Gaia DR3 is incomplete
    // brighter than G ~ 3; Gaia Collaboration 2023, A&A 674, A1; from memory).
    double g_bright_limit_mag = 3.0;
    double bp_rp_loss_start_g_mag = 19.0; // BP/RP loss probability 0 here ...
    double bp_rp_loss_end_g_mag = 21.0;   // ... rising linearly to 1 here (common practice, no source)
    double j_limit_mag = 15.8; // 2MASS 10-sigma limits (Skrutskie et al. 2006, AJ 131, 1163; from memory);
    double h_limit_mag = 15.1; // fainter: no value in that band
    double ks_limit_mag = 14.3;
    double ruwe_scatter_dex =
        0.04; // log10 RUWE ~ N(0, this) for well-behaved sources (common practice, no source)
    double binary_high_ruwe_share = 0.4; // binaries whose orbit shows: RUWE log-uniform in the range below
    double binary_high_ruwe_min = 1.4;   // (common practice, no source)
    double binary_high_ruwe_max = 10.0;
    CompanionSettings companion;
};

/// Throws InputError naming the option (Options.h spelling, e.g. "--density") for a bad value.
void validateMockSettings(const MockSettings& settings);

/// Evolutionary stage of one component.
enum class MockStage : std::uint8_t {
    MainSequence,
    BrownDwarf,
    Giant,
    WhiteDwarf,
};
inline constexpr std::array<const char*, 4> kMockStageNames = {"main_sequence", "brown_dwarf", "giant",
                                                               "white_dwarf"};

/// The truth of one simulated object (an unresolved system), catalogued or not.
struct ObjectTruth {
    std::int64_t source_id = photometry::kMissingSourceId; // also the catalog row's source_id
    photometry::StellarClass true_class =
        photometry::StellarClass::Unclassified;  // the G-brighter component's
    MockStage stage = MockStage::MainSequence;   // the G-brighter component's
    double spectral_code = photometry::kMissing; // dwarf code; NaN for giants and white dwarfs
    double distance_pc = photometry::kMissing;
    double mass_msun = photometry::kMissing; // present-day primary mass
    double initial_mass_msun = photometry::kMissing;
    double age_gyr = photometry::kMissing;
    bool binary = false; // a visible (non-NS/BH) companion
    photometry::StellarClass companion_class = photometry::StellarClass::Unclassified;
    double companion_mass_msun = photometry::kMissing; // present-day
    // The resolved system: every object of one system has the source_id of its first object (the one
    // the system was drawn around) as system_source_id; the others are resolved companions, at this
    // projected separation (au) and angle (arcsec) from it.
    std::int64_t system_source_id = photometry::kMissingSourceId;
    bool resolved_companion = false;
    double separation_au = 0.0;
    double separation_arcsec = 0.0;
    double velocity_ra_km_s = photometry::kMissing; // true tangential velocity per axis (km/s)
    double velocity_dec_km_s = photometry::kMissing;
    double abs_g_mag = photometry::kMissing;  // combined absolute G (mag)
    double true_g_mag = photometry::kMissing; // combined apparent G without errors (mag)
    bool catalogued = false;                  // in the Gaia-like catalogue
    bool in_companion = false;                // in the companion catalogue (CompanionSettings)
    std::int64_t companion_row = -1;          // its row there (0-based), -1 if none
};

/// A row of the companion catalogue: its measurements and its literature spectral type ("" = none).
struct CompanionRow {
    photometry::CatalogRow row;
    std::string spectral_type;
};

/// Objects of each class within one radius. "components" counts primaries and companions separately,
/// each by its own class (the stars-and-brown-dwarfs count of a census, vs. its system count).
struct RadiusCounts {
    double radius_pc = 0.0;
    std::array<std::int64_t, photometry::kClassCount> all{};
    std::array<std::int64_t, photometry::kClassCount> catalogued{};
    std::array<std::int64_t, photometry::kClassCount> components{};
    std::array<std::int64_t, photometry::kClassCount> in_companion{};
    std::array<std::int64_t, photometry::kClassCount> in_both{};     // catalogued and in the companion
    std::array<std::int64_t, photometry::kClassCount> in_any_file{}; // catalogued or in the companion
};

/// Counts by class within each radius (pc; any order). Pure: call once over all truth, or accumulate.
std::vector<RadiusCounts> countWithinRadii(std::span<const ObjectTruth> truth,
                                           std::span<const double> radii_pc);
void addToCounts(std::span<const ObjectTruth> truth, std::vector<RadiusCounts>& counts);

struct MockResult {
    MockSettings settings;
    std::uint64_t seed = 0;
    std::vector<photometry::CatalogRow> catalog; // catalogued objects, by system distance
    std::vector<ObjectTruth> truth;              // every object, by system distance (companions follow)
    std::vector<CompanionRow> companion_catalog; // the companion catalogue, if enabled, by distance
    std::int64_t remnant_only_systems = 0;       // systems of NS/BH only: removed, in neither list
};

/// Simulates chunk by chunk; results do not depend on the chunk sizes, and the objects of a smaller
/// sphere are the inner objects of a larger one with the same seed and settings.
class MockGenerator {
  public:
    /// `photometry` must outlive the generator. Throws InputError for invalid settings.
    MockGenerator(const MockSettings& settings, std::uint64_t seed,
                  const photometry::ModelPhotometry& photometry);

    /// Appends up to `max_systems` further systems to the lists (the companion catalogue's rows to
    /// `companion_catalog` if given and enabled); false when the sphere is exhausted.
    bool next(std::size_t max_systems, std::vector<photometry::CatalogRow>& catalog,
              std::vector<ObjectTruth>& truth, std::vector<CompanionRow>* companion_catalog = nullptr);
    std::int64_t remnantOnlySystems() const { return remnant_only_systems_; }
    const MockSettings& settings() const { return settings_; }

  private:
    struct Component;
    struct Placement;
    Component makeComponent(double initial_mass_msun, double age_gyr, Xoshiro256& random);
    /// Appends the object of one component (and its unresolved companion, if any) as truth and, if
    /// detected, catalog row; its measurements come from `random`.
    void addObject(Component primary, Component companion, const Placement& placement, Xoshiro256& random,
                   std::vector<photometry::CatalogRow>& catalog, std::vector<ObjectTruth>& truth);
    void addResolvedCompanions(const Component& first, const Placement& first_placement, double age_gyr,
                               std::vector<photometry::CatalogRow>& catalog, std::vector<ObjectTruth>& truth);
    /// The companion catalogue's row of an object, if it has one (sets object.in_companion).
    void addCompanionRow(ObjectTruth& object, const Component& primary, const photometry::BandMagnitudes& abs,
                         const photometry::CatalogRow& survey_row);

    MockSettings settings_;
    std::uint64_t seed_;
    const photometry::ModelPhotometry& photometry_;
    InitialMassFunction imf_;
    Xoshiro256 positions_;  // volume gaps, directions
    Xoshiro256 properties_; // everything else of the first object of each system
    Xoshiro256 companions_; // the resolved companions: their orbits, components and measurements
    double enclosed_volume_pc3_ = 0.0;
    double volume_max_pc3_;
    std::int64_t systems_ = 0;
    std::int64_t companions_made_ = 0; // resolved companions so far (their source ids)
    std::int64_t catalogued_ = 0;
    std::int64_t companion_catalogued_ = 0;
    std::int64_t remnant_only_systems_ = 0;
    std::vector<CompanionRow>* companion_catalog_ = nullptr; // during next()
    bool done_ = false;
};

/// The whole mock at once, with the shipped photometric tables.
MockResult simulateNeighbourhood(const MockSettings& settings, std::uint64_t seed);
MockResult simulateNeighbourhood(const MockSettings& settings, std::uint64_t seed,
                                 const photometry::ModelPhotometry& photometry);

/// Unique, positive, well-mixed source identifiers: a bijection of the object index (per seed), so ids
/// carry no distance order.
std::int64_t mockSourceId(std::uint64_t seed, std::int64_t object_index);

/// log g (cgs) of a white dwarf of this mass (Msun): Nauenberg 1972 (ApJ 175, 417) zero-temperature
/// mass-radius relation R = 0.0112 Rsun [(M/Mch)^-2/3 - (M/Mch)^2/3]^1/2, Mch = 1.454 Msun (from
/// memory); 8.02 at 0.6 Msun.
double whiteDwarfLogG(double mass_msun);

} // namespace starcensus::census::mock
