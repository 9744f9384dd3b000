#include "census/mock/Neighbourhood.h"

#include "census/CatalogMerge.h"
#include "census/mock/MeasurementErrors.h"
#include "photometry/base/OptionChecks.h"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <string_view>
#include <tuple>
#include <utility>

namespace starcensus::census::mock {

using photometry::StellarClass;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// 1 au/yr in km/s (IAU 2012 au, Julian year): v_t [km/s] = 4.74047 mu [arcsec/yr] d [pc].
constexpr double kKmPerSecondPerAuPerYear = 4.74047;
constexpr double kRadiansPerDegree = std::numbers::pi / 180.0;
constexpr double kAuPerPc = 206264.806;
// Resolved companions take source ids from this object index on: a bijection's inputs apart from the
// systems' (fewer than 2^40 systems).
constexpr std::int64_t kCompanionIndexOffset = std::int64_t{1} << 40;

double dot(const std::array<double, 3>& a, const std::array<double, 3>& b) {
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

std::array<double, 3> randomUnitVector(Xoshiro256& random) {
    const double z = 2.0 * random.uniform() - 1.0;
    const double phi = 2.0 * std::numbers::pi * random.uniform();
    const double r = std::sqrt(1.0 - z * z);
    return {r * std::cos(phi), r * std::sin(phi), z};
}

// Red-clump calibration of Ruiz-Dern et al. 2018 (A&A 609, A116, abstract; published-figures.md
// section 7): M_G = 0.495 + 1.121 (G - Ks - 2.1).
constexpr double kClumpAbsGMag = 0.495;
constexpr double kClumpAbsGSlope = 1.121;
constexpr double kClumpGKsPivotMag = 2.1;

double fluxOf(double magnitude) {
    return std::isnan(magnitude) ? 0.0 : std::pow(10.0, -0.4 * magnitude);
}

// Magnitude of the summed flux of two sources; NaN if neither has the band.
double addMagnitudes(double a, double b) {
    if (std::isnan(a)) {
        return b;
    }
    if (std::isnan(b)) {
        return a;
    }
    return -2.5 * std::log10(fluxOf(a) + fluxOf(b));
}

photometry::BandMagnitudes combine(const photometry::BandMagnitudes& a, const photometry::BandMagnitudes& b) {
    return {addMagnitudes(a.g, b.g),  addMagnitudes(a.bp, b.bp), addMagnitudes(a.rp, b.rp),
            addMagnitudes(a.j, b.j),  addMagnitudes(a.h, b.h),   addMagnitudes(a.ks, b.ks),
            addMagnitudes(a.b, b.b),  addMagnitudes(a.v, b.v),   addMagnitudes(a.w1, b.w1),
            addMagnitudes(a.w2, b.w2)};
}

// A measured magnitude: Gaussian noise on the flux, sigma_flux / flux = sigma_mag / (2.5 / ln 10), so a
// source far below the limit cannot scatter into the catalog the way a magnitude-space Gaussian with
// an extrapolated error would let it. NaN if the measured flux is not positive (not detected).
double observeMagnitude(double true_mag, double sigma_mag, Xoshiro256& random) {
    const double relative_flux = 1.0 + sigma_mag / (2.5 / std::numbers::ln10) * random.normal();
    return relative_flux > 0.0 ? true_mag - 2.5 * std::log10(relative_flux) : kNaN;
}

// A Gaussian measurement in magnitude with its quoted error (mag): NaN, NaN for a NaN band.
std::pair<double, double> magnitudeObservation(double true_mag, double error_mag, Xoshiro256& random) {
    if (std::isnan(true_mag)) {
        return {kNaN, kNaN};
    }
    return {true_mag + error_mag * random.normal(), error_mag};
}

// Observed value of a band of the 2MASS-like survey and its quoted error (mag): NaN beyond its limit.
std::pair<double, double> twoMassObservation(double true_mag, double limit_mag, Xoshiro256& random) {
    if (std::isnan(true_mag) || true_mag > limit_mag) {
        return {kNaN, kNaN};
    }
    return magnitudeObservation(true_mag, twoMassErrorMag(true_mag, limit_mag), random);
}

// A literature spectral type of a dwarf code, to the half subtype below it (so the letter is the true
// one): "T6.5", "L5"; with a luminosity class appended ("A1V", "K2III") when given.
std::string literatureTypeOf(double spectral_code, const char* luminosity_class) {
    const double half_subtypes = std::floor(std::clamp(spectral_code, 0.0, 99.9) * 2.0) / 2.0;
    const int letter = static_cast<int>(half_subtypes / 10.0);
    constexpr std::string_view kLetters = "OBAFGKMLTY"; // photometry/StellarClass.h's codes
    char buffer[16];
    std::snprintf(buffer, sizeof buffer, "%c%g%s", kLetters[static_cast<std::size_t>(letter)],
                  half_subtypes - 10.0 * letter, luminosity_class);
    return buffer;
}

} // namespace

void validateMockSettings(const MockSettings& s) {
    validateImfSettings(s.imf);
    requireInRange("radius-max", s.radius_max_pc, 0.0, 10000.0, "pc", LowerBound::Exclusive);
    requireInRange("density", s.system_density_per_pc3, 0.0, 100.0, "per pc^3", LowerBound::Exclusive);
    requireInRange("velocity-dispersion", s.velocity_dispersion_km_s, 0.0, 500.0, "km/s");
    requireInRange("disc-age", s.disc_age_gyr, 0.0, 13.8, "Gyr", LowerBound::Exclusive);
    requireInRange("ms-lifetime-sun", s.ms_lifetime_sun_gyr, 0.0, 100.0, "Gyr", LowerBound::Exclusive);
    requireInRange("ms-lifetime-exponent", s.ms_lifetime_exponent, -5.0, -0.5, "");
    requireInRange("giant-share", s.giant_phase_share, 0.0, 1.0, "");
    requireInRange("wd-progenitor-max", s.max_white_dwarf_progenitor_msun, 1.0, 20.0, "Msun");
    requireInRange("hydrogen-burning-limit", s.hydrogen_burning_limit_msun, 0.01, 0.2, "Msun");
    requireInRange("bd-teff-min", s.brown_dwarf_teff_min_k, 100.0, 2000.0, "K");
    requireInRange("bd-teff-max", s.brown_dwarf_teff_max_k, 500.0, 4000.0, "K");
    requireThat(s.brown_dwarf_teff_min_k < s.brown_dwarf_teff_max_k, "bd-teff-min",
                "must be below --bd-teff-max");
    requireInRange("ifmr-slope", s.ifmr_slope, 0.0, 1.0, "");
    requireInRange("ifmr-intercept", s.ifmr_intercept_msun, 0.0, 1.4, "Msun");
    requireInRange("da-share", s.hydrogen_atmosphere_share, 0.0, 1.0, "");
    requireInRange("binary-fraction", s.binary_fraction, 0.0, 1.0, "");
    requireInRange("wide-fraction", s.wide_companion_fraction, 0.0, 1.0, "");
    requireInRange("wide-triple-share", s.wide_triple_share, 0.0, 1.0, "");
    requireInRange("wide-log-period-mean", s.wide_log_period_mean_day, 0.0, 12.0, "dex");
    requireInRange("wide-log-period-sigma", s.wide_log_period_sigma_dex, 0.0, 5.0, "dex");
    requireInRange("resolution-limit", s.resolution_limit_arcsec, 0.0, 60.0, "arcsec");
    requireInRange("wide-separation-max", s.wide_max_separation_au, 1.0, 1e7, "au");
    requireInRange("ms-mag-scatter", s.ms_abs_mag_scatter_mag, 0.0, 2.0, "mag");
    requireInRange("ms-colour-scatter", s.ms_colour_scatter_mag, 0.0, 1.0, "mag");
    requireInRange("giant-mag-scatter", s.giant_abs_g_scatter_mag, 0.0, 2.0, "mag");
    requireInRange("giant-bp-rp", s.giant_bp_rp_mag, 0.0, 3.0, "mag");
    requireInRange("giant-bp-rp-scatter", s.giant_bp_rp_scatter_mag, 0.0, 1.0, "mag");
    requireInRange("giant-g-ks", s.giant_g_ks_mag, 0.0, 5.0, "mag");
    requireInRange("giant-g-ks-scatter", s.giant_g_ks_scatter_mag, 0.0, 1.0, "mag");
    requireInRange("g-limit", s.g_limit_mag, 3.0, 25.0, "mag");
    requireInRange("g-bright-limit", s.g_bright_limit_mag, -30.0, 25.0, "mag");
    requireThat(s.g_bright_limit_mag < s.g_limit_mag, "g-bright-limit", "must be below --g-limit");
    const CompanionSettings& c = s.companion;
    requireInRange("companion-epoch", c.epoch_yr, 1900.0, 2100.0, "yr");
    requireInRange("ultracool-min-code", c.ultracool_min_code, 60.0, 99.0, "");
    requireInRange("w1-limit", c.w1_limit_mag, 0.0, 30.0, "mag");
    requireInRange("w2-limit", c.w2_limit_mag, 0.0, 30.0, "mag");
    requireInRange("followup-j-limit", c.followup_j_limit_mag, 0.0, 30.0, "mag");
    requireInRange("followup-h-limit", c.followup_h_limit_mag, 0.0, 30.0, "mag");
    requireInRange("followup-ks-limit", c.followup_ks_limit_mag, 0.0, 30.0, "mag");
    requireInRange("ultracool-parallax-error", c.ultracool_parallax_error_mas, 0.0, 10.0, "mas",
                   LowerBound::Exclusive);
    requireInRange("ultracool-position-error", c.ultracool_position_error_arcsec, 0.0, 10.0, "arcsec");
    requireInRange("spectral-type-share", c.spectral_type_share, 0.0, 1.0, "");
    requireInRange("hipparcos-parallax-error", c.hipparcos_parallax_error_mas, 0.0, 10.0, "mas",
                   LowerBound::Exclusive);
    requireInRange("hipparcos-pm-error", c.hipparcos_pm_error_mas_per_yr, 0.0, 10.0, "mas/yr");
    requireInRange("johnson-error", c.johnson_error_mag, 0.0, 1.0, "mag", LowerBound::Exclusive);
    requireInRange("two-mass-saturation", c.two_mass_saturation_mag, -5.0, 20.0, "mag");
    requireInRange("bright-two-mass-error", c.bright_two_mass_error_mag, 0.0, 2.0, "mag",
                   LowerBound::Exclusive);
    requireInRange("bp-rp-loss-start", s.bp_rp_loss_start_g_mag, 3.0, 25.0, "mag");
    requireInRange("bp-rp-loss-end", s.bp_rp_loss_end_g_mag, 3.0, 25.0, "mag");
    requireThat(s.bp_rp_loss_start_g_mag < s.bp_rp_loss_end_g_mag, "bp-rp-loss-start",
                "must be below --bp-rp-loss-end");
    requireInRange("j-limit", s.j_limit_mag, 0.0, 25.0, "mag");
    requireInRange("h-limit", s.h_limit_mag, 0.0, 25.0, "mag");
    requireInRange("ks-limit", s.ks_limit_mag, 0.0, 25.0, "mag");
    requireInRange("ruwe-scatter", s.ruwe_scatter_dex, 0.0, 1.0, "dex");
    requireInRange("binary-high-ruwe-share", s.binary_high_ruwe_share, 0.0, 1.0, "");
    requireInRange("binary-high-ruwe-min", s.binary_high_ruwe_min, 1.0, 100.0, "");
    requireInRange("binary-high-ruwe-max", s.binary_high_ruwe_max, 1.0, 100.0, "");
    requireThat(s.binary_high_ruwe_min < s.binary_high_ruwe_max, "binary-high-ruwe-min",
                "must be below --binary-high-ruwe-max");
}

double whiteDwarfLogG(double mass_msun) {
    constexpr double kChandrasekharMsun = 1.454; // mu_e = 2 (from memory)
    constexpr double kLogGSun = 4.438;           // log10 of solar surface gravity, cgs (from memory)
    const double x = std::pow(mass_msun / kChandrasekharMsun, 2.0 / 3.0);
    const double radius_rsun = 0.0112 * std::sqrt(1.0 / x - x);
    return kLogGSun + std::log10(mass_msun) - 2.0 * std::log10(radius_rsun);
}

std::int64_t mockSourceId(std::uint64_t seed, std::int64_t object_index) {
    // Invertible steps on 62-bit integers (odd multipliers and right xor-shifts are bijections modulo
    // 2^62), offset into [2^62, 2^63) so every id is positive and has 19 digits.
    constexpr std::uint64_t kMask = (std::uint64_t{1} << 62) - 1;
    std::uint64_t x = (static_cast<std::uint64_t>(object_index) + seed * 0x9E3779B97F4A7C15ULL) & kMask;
    x ^= x >> 31;
    x = (x * 0xBF58476D1CE4E5B9ULL) & kMask;
    x ^= x >> 29;
    x = (x * 0x94D049BB133111EBULL) & kMask;
    x ^= x >> 32;
    return static_cast<std::int64_t>(x | (std::uint64_t{1} << 62));
}

std::vector<RadiusCounts> countWithinRadii(std::span<const ObjectTruth> truth,
                                           std::span<const double> radii_pc) {
    std::vector<RadiusCounts> counts;
    for (double radius : radii_pc) {
        counts.push_back({radius, {}, {}, {}, {}, {}, {}});
    }
    addToCounts(truth, counts);
    return counts;
}

void addToCounts(std::span<const ObjectTruth> truth, std::vector<RadiusCounts>& counts) {
    for (const ObjectTruth& object : truth) {
        const auto primary = static_cast<std::size_t>(object.true_class);
        for (RadiusCounts& within : counts) {
            if (object.distance_pc <= within.radius_pc) {
                ++within.all[primary];
                ++within.components[primary];
                if (object.binary) {
                    ++within.components[static_cast<std::size_t>(object.companion_class)];
                }
                if (object.catalogued) {
                    ++within.catalogued[primary];
                }
                within.in_companion[primary] += object.in_companion ? 1 : 0;
                within.in_both[primary] += object.catalogued && object.in_companion ? 1 : 0;
                within.in_any_file[primary] += object.catalogued || object.in_companion ? 1 : 0;
            }
        }
    }
}

struct MockGenerator::Component {
    bool compact_remnant = false; // NS/BH: removed
    MockStage stage = MockStage::MainSequence;
    StellarClass star_class = StellarClass::Unclassified;
    double spectral_code = kNaN;
    double initial_mass_msun = kNaN;
    double mass_msun = kNaN; // present day
    photometry::BandMagnitudes abs{kNaN, kNaN, kNaN, kNaN, kNaN, kNaN};
};

MockGenerator::MockGenerator(const MockSettings& settings, std::uint64_t seed,
                             const photometry::ModelPhotometry& photometry)
    : settings_(settings), seed_(seed), photometry_(photometry),
      imf_((validateMockSettings(settings), settings.imf)), positions_(seed, 0), properties_(seed, 1),
      companions_(seed, 2),
      volume_max_pc3_(4.0 / 3.0 * std::numbers::pi * std::pow(settings.radius_max_pc, 3)) {}

MockGenerator::Component MockGenerator::makeComponent(double initial_mass_msun, double age_gyr,
                                                      Xoshiro256& random) {
    const MockSettings& s = settings_;
    Component c;
    c.initial_mass_msun = initial_mass_msun;
    c.mass_msun = initial_mass_msun;
    const double lifetime_gyr = s.ms_lifetime_sun_gyr * std::pow(initial_mass_msun, s.ms_lifetime_exponent);
    const bool dwarf = initial_mass_msun < s.hydrogen_burning_limit_msun || age_gyr < lifetime_gyr;
    if (dwarf) {
        if (initial_mass_msun < s.hydrogen_burning_limit_msun) {
            c.stage = MockStage::BrownDwarf;
            const double teff_k = std::clamp(photometry::brownDwarfTeffK(initial_mass_msun, age_gyr),
                                             s.brown_dwarf_teff_min_k, s.brown_dwarf_teff_max_k);
            c.spectral_code = photometry_.codeOfTeff(teff_k);
        } else {
            c.stage = MockStage::MainSequence;
            c.spectral_code = photometry_.codeOfMass(initial_mass_msun);
        }
        c.star_class = photometry::dwarfClassOfCode(c.spectral_code);
        c.abs = photometry_.dwarf(c.spectral_code);
        // Intrinsic scatter: one shift of every band (luminosity), plus small colour offsets.
        const double shift = s.ms_abs_mag_scatter_mag * random.normal();
        const double optical = s.ms_colour_scatter_mag * random.normal();
        const double infrared = s.ms_colour_scatter_mag * random.normal();
        c.abs.g += shift;
        c.abs.bp += shift + 0.5 * optical;
        c.abs.rp += shift - 0.5 * optical;
        c.abs.j += shift + 0.5 * infrared;
        c.abs.h += shift;
        c.abs.ks += shift - 0.5 * infrared;
        // Johnson and WISE bands follow the luminosity shift only (no draw of their own, so the
        // Gaia-like catalogue's streams are as they were before these bands existed).
        c.abs.b += shift;
        c.abs.v += shift;
        c.abs.w1 += shift;
        c.abs.w2 += shift;
        return c;
    }
    const double giant_end_gyr = (1.0 + s.giant_phase_share) * lifetime_gyr;
    if (age_gyr < giant_end_gyr) {
        // Near the red clump: G-Ks and BP-RP drawn around their clump values, M_G from the Ruiz-Dern
        // et al. 2018 relation plus scatter; G-RP and J-Ks from the dwarf of the same BP-RP.
        c.stage = MockStage::Giant;
        c.star_class = StellarClass::Evolved;
        const double bp_rp = s.giant_bp_rp_mag + s.giant_bp_rp_scatter_mag * random.normal();
        const double g_ks = s.giant_g_ks_mag + s.giant_g_ks_scatter_mag * random.normal();
        const photometry::BandMagnitudes same_colour = photometry_.dwarf(photometry_.codeOfBpRp(bp_rp));
        c.abs.g = kClumpAbsGMag + kClumpAbsGSlope * (g_ks - kClumpGKsPivotMag) +
                  s.giant_abs_g_scatter_mag * random.normal();
        c.abs.rp = c.abs.g - (same_colour.g - same_colour.rp);
        c.abs.bp = c.abs.rp + bp_rp;
        c.abs.ks = c.abs.g - g_ks;
        c.abs.j = c.abs.ks + (same_colour.j - same_colour.ks);
        c.abs.h = photometry::absHFromJKs(c.abs.j, c.abs.ks);
        // Johnson and WISE bands: the same-colour dwarf's G - V, B - V, Ks - W1 and W1 - W2.
        c.abs.v = c.abs.g - (same_colour.g - same_colour.v);
        c.abs.b = c.abs.v + (same_colour.b - same_colour.v);
        c.abs.w1 = c.abs.ks - (same_colour.ks - same_colour.w1);
        c.abs.w2 = c.abs.w1 - (same_colour.w1 - same_colour.w2);
        return c;
    }
    if (initial_mass_msun > s.max_white_dwarf_progenitor_msun) {
        c.compact_remnant = true;
        return c;
    }
    c.stage = MockStage::WhiteDwarf;
    c.star_class = StellarClass::WhiteDwarf;
    c.mass_msun = s.ifmr_slope * initial_mass_msun + s.ifmr_intercept_msun;
    // The Montreal grids span log g 7.0-9.0.
    const double log_g = std::clamp(whiteDwarfLogG(c.mass_msun), 7.0, 9.0);
    const double cooling_age_yr = (age_gyr - giant_end_gyr) * 1e9;
    const bool hydrogen = random.uniform() < s.hydrogen_atmosphere_share;
    c.abs = photometry_.whiteDwarf(cooling_age_yr, log_g,
                                   hydrogen ? photometry::WhiteDwarfAtmosphere::Hydrogen
                                            : photometry::WhiteDwarfAtmosphere::Helium);
    if (std::isnan(c.abs.g) && !hydrogen) {
        // Older than the helium grid reaches (Teff < 3250 K): use the hydrogen grid.
        c.abs = photometry_.whiteDwarf(cooling_age_yr, log_g, photometry::WhiteDwarfAtmosphere::Hydrogen);
    }
    return c;
}

struct MockGenerator::Placement {
    double distance_pc = kNaN;
    double age_gyr = kNaN;
    double ra_deg = kNaN;
    double dec_deg = kNaN;
    double velocity_ra_km_s = kNaN; // tangential velocity per axis; NaN: drawn by addObject
    double velocity_dec_km_s = kNaN;
    std::int64_t source_id = photometry::kMissingSourceId;
    std::int64_t system_source_id = photometry::kMissingSourceId;
    bool resolved_companion = false;
    double separation_au = 0.0;
    double separation_arcsec = 0.0;
};

void MockGenerator::addObject(Component primary, Component companion, const Placement& placement,
                              Xoshiro256& random, std::vector<photometry::CatalogRow>& catalog,
                              std::vector<ObjectTruth>& truth) {
    const MockSettings& s = settings_;
    const double distance_pc = placement.distance_pc;
    const bool has_companion = !companion.compact_remnant;
    if (has_companion && companion.abs.g < primary.abs.g) {
        // The truth names the component that dominates the G light, the one a photometric census
        // can classify (a white dwarf with a brighter M dwarf companion is seen as an M dwarf).
        std::swap(primary, companion);
    }
    const photometry::BandMagnitudes abs = has_companion ? combine(primary.abs, companion.abs) : primary.abs;
    const double modulus = 5.0 * std::log10(distance_pc) - 5.0;

    ObjectTruth object;
    object.source_id = placement.source_id;
    object.system_source_id = placement.system_source_id;
    object.resolved_companion = placement.resolved_companion;
    object.separation_au = placement.separation_au;
    object.separation_arcsec = placement.separation_arcsec;
    object.true_class = primary.star_class;
    object.stage = primary.stage;
    object.spectral_code = primary.spectral_code;
    object.distance_pc = distance_pc;
    object.mass_msun = primary.mass_msun;
    object.initial_mass_msun = primary.initial_mass_msun;
    object.age_gyr = placement.age_gyr;
    object.binary = has_companion;
    if (has_companion) {
        object.companion_class = companion.star_class;
        object.companion_mass_msun = companion.mass_msun;
    }
    object.abs_g_mag = abs.g;
    object.true_g_mag = abs.g + modulus;

    // What the survey measures.
    photometry::CatalogRow row;
    row.source_id = object.source_id;
    row.ra_deg = placement.ra_deg;
    row.dec_deg = placement.dec_deg;
    const double g_obs = observeMagnitude(object.true_g_mag, gMagErrorMag(object.true_g_mag), random);
    row.g_mag = g_obs;
    row.g_error_mag = gMagErrorMag(g_obs);
    if (random.uniform() >= bpRpLossProbability(g_obs, s.bp_rp_loss_start_g_mag, s.bp_rp_loss_end_g_mag)) {
        // The draws use the unrounded errors, as the magnitudes' (CatalogRow holds floats).
        const double bp_error_mag = bpMagErrorMag(g_obs);
        const double rp_error_mag = rpMagErrorMag(g_obs);
        row.bp_error_mag = bp_error_mag;
        row.rp_error_mag = rp_error_mag;
        row.bp_mag = observeMagnitude(abs.bp + modulus, bp_error_mag, random);
        row.rp_mag = observeMagnitude(abs.rp + modulus, rp_error_mag, random);
        if (std::isnan(row.bp_mag)) {
            row.bp_error_mag = kNaN;
        }
        if (std::isnan(row.rp_mag)) {
            row.rp_error_mag = kNaN;
        }
    }
    const double parallax_mas = 1000.0 / distance_pc;
    row.parallax_error_mas = parallaxErrorMas(g_obs);
    row.parallax_mas = parallax_mas + row.parallax_error_mas * random.normal();
    // Tangential velocity per axis -> proper motion: mu [mas/yr] = 1000 v / (4.74047 d [pc]).
    const double pm_error = properMotionErrorMasPerYr(g_obs);
    const double to_pm = 1000.0 / (kKmPerSecondPerAuPerYear * distance_pc);
    // A system's first object draws its velocity here (the draws interleave with the errors' as they
    // always have, so mocks without resolved companions repeat); companions are given theirs.
    object.velocity_ra_km_s = std::isnan(placement.velocity_ra_km_s)
                                  ? s.velocity_dispersion_km_s * random.normal()
                                  : placement.velocity_ra_km_s;
    row.pmra_mas_per_yr = to_pm * object.velocity_ra_km_s + pm_error * random.normal();
    object.velocity_dec_km_s = std::isnan(placement.velocity_dec_km_s)
                                   ? s.velocity_dispersion_km_s * random.normal()
                                   : placement.velocity_dec_km_s;
    row.pmdec_mas_per_yr = to_pm * object.velocity_dec_km_s + pm_error * random.normal();
    std::tie(row.j_mag, row.j_error_mag) = twoMassObservation(abs.j + modulus, s.j_limit_mag, random);
    std::tie(row.h_mag, row.h_error_mag) = twoMassObservation(abs.h + modulus, s.h_limit_mag, random);
    std::tie(row.ks_mag, row.ks_error_mag) = twoMassObservation(abs.ks + modulus, s.ks_limit_mag, random);
    if (has_companion && random.uniform() < s.binary_high_ruwe_share) {
        row.ruwe = s.binary_high_ruwe_min *
                   std::pow(s.binary_high_ruwe_max / s.binary_high_ruwe_min, random.uniform());
    } else {
        row.ruwe = std::pow(10.0, s.ruwe_scatter_dex * random.normal());
    }
    object.catalogued = g_obs <= s.g_limit_mag && g_obs >= s.g_bright_limit_mag; // false for NaN
    if (object.catalogued) {
        row.row_index = catalogued_++;
        catalog.push_back(row);
    }
    if (companion_catalog_ != nullptr && s.companion.enabled) {
        addCompanionRow(object, primary, abs, row);
    }
    truth.push_back(object);
}

void MockGenerator::addCompanionRow(ObjectTruth& object, const Component& primary,
                                    const photometry::BandMagnitudes& abs,
                                    const photometry::CatalogRow& survey_row) {
    const CompanionSettings& c = settings_.companion;
    const bool ultracool =
        (primary.stage == MockStage::MainSequence || primary.stage == MockStage::BrownDwarf) &&
        primary.spectral_code >= c.ultracool_min_code;
    const bool bright = object.true_g_mag < settings_.g_bright_limit_mag;
    if (!ultracool && !bright) {
        return;
    }
    // A stream per object (its source_id), apart from the Gaia-like catalogue's streams.
    constexpr std::uint64_t kCompanionStreamTag = 0xC0A1E5CE0000ULL;
    Xoshiro256 random(seed_, kCompanionStreamTag ^ static_cast<std::uint64_t>(object.source_id));
    const double modulus = 5.0 * std::log10(object.distance_pc) - 5.0;
    CompanionRow out;
    photometry::CatalogRow& row = out.row; // no Gaia source_id
    double parallax_error_mas = c.hipparcos_parallax_error_mas;
    double pm_error_mas_per_yr = c.hipparcos_pm_error_mas_per_yr;
    double position_error_arcsec = 0.001; // Hipparcos: ~1 mas at its epoch (from memory)
    if (ultracool) {
        // Detection in W2 with the noise in flux, as for G (observeMagnitude), so sources far below the
        // limit cannot scatter in.
        const double true_w2 = abs.w2 + modulus;
        const double w2_mag = observeMagnitude(true_w2, wiseErrorMag(true_w2, c.w2_limit_mag), random);
        row.w2_mag = static_cast<float>(w2_mag); // the catalogue keeps it as a float
        if (!(w2_mag <= c.w2_limit_mag)) {
            return; // not detected by the WISE-like survey
        }
        row.w2_error_mag = static_cast<float>(wiseErrorMag(w2_mag, c.w2_limit_mag));
        const double true_w1 = abs.w1 + modulus;
        if (true_w1 <= c.w1_limit_mag) { // fainter: an upper limit, listed as missing
            std::tie(row.w1_mag, row.w1_error_mag) =
                magnitudeObservation(true_w1, wiseErrorMag(true_w1, c.w1_limit_mag), random);
        }
        std::tie(row.j_mag, row.j_error_mag) =
            twoMassObservation(abs.j + modulus, c.followup_j_limit_mag, random);
        std::tie(row.h_mag, row.h_error_mag) =
            twoMassObservation(abs.h + modulus, c.followup_h_limit_mag, random);
        std::tie(row.ks_mag, row.ks_error_mag) =
            twoMassObservation(abs.ks + modulus, c.followup_ks_limit_mag, random);
        parallax_error_mas = std::min(10.0, c.ultracool_parallax_error_mas *
                                                std::pow(10.0, 0.2 * std::max(0.0, w2_mag - 13.0)));
        pm_error_mas_per_yr = parallax_error_mas;
        position_error_arcsec = c.ultracool_position_error_arcsec;
        if (random.uniform() < c.spectral_type_share) {
            out.spectral_type = literatureTypeOf(primary.spectral_code, "");
        }
    } else {
        std::tie(row.b_mag, row.b_error_mag) =
            magnitudeObservation(abs.b + modulus, c.johnson_error_mag, random);
        std::tie(row.v_mag, row.v_error_mag) =
            magnitudeObservation(abs.v + modulus, c.johnson_error_mag, random);
        const auto two_mass = [&](double true_mag, double limit_mag) {
            return magnitudeObservation(true_mag,
                                        true_mag < c.two_mass_saturation_mag
                                            ? c.bright_two_mass_error_mag
                                            : twoMassErrorMag(true_mag, limit_mag),
                                        random);
        };
        std::tie(row.j_mag, row.j_error_mag) = two_mass(abs.j + modulus, settings_.j_limit_mag);
        std::tie(row.h_mag, row.h_error_mag) = two_mass(abs.h + modulus, settings_.h_limit_mag);
        std::tie(row.ks_mag, row.ks_error_mag) = two_mass(abs.ks + modulus, settings_.ks_limit_mag);
        if (random.uniform() < c.spectral_type_share && !std::isnan(primary.spectral_code)) {
            out.spectral_type =
                literatureTypeOf(primary.spectral_code, primary.stage == MockStage::Giant ? "III" : "V");
        }
    }
    row.parallax_error_mas = parallax_error_mas;
    row.parallax_mas = 1000.0 / object.distance_pc + parallax_error_mas * random.normal();
    // The true position (the Gaia-like catalogue's, at J2016.0) moved to the companion's epoch along the
    // true proper motion, plus the position error; the proper motion as measured.
    photometry::CatalogRow truth_row = survey_row;
    const double to_pm = 1000.0 / (kKmPerSecondPerAuPerYear * object.distance_pc);
    truth_row.pmra_mas_per_yr = to_pm * object.velocity_ra_km_s;
    truth_row.pmdec_mas_per_yr = to_pm * object.velocity_dec_km_s;
    const SkyPosition at_epoch = positionAtEpoch(truth_row, kGaiaDr3EpochYr, c.epoch_yr);
    row.dec_deg = at_epoch.dec_deg + position_error_arcsec / 3600.0 * random.normal();
    row.ra_deg = std::fmod(at_epoch.ra_deg +
                               position_error_arcsec / 3600.0 * random.normal() /
                                   std::cos(at_epoch.dec_deg * kRadiansPerDegree) +
                               360.0,
                           360.0);
    row.pmra_mas_per_yr = truth_row.pmra_mas_per_yr + pm_error_mas_per_yr * random.normal();
    row.pmdec_mas_per_yr = truth_row.pmdec_mas_per_yr + pm_error_mas_per_yr * random.normal();
    row.row_index = companion_catalogued_++;
    object.in_companion = true;
    object.companion_row = row.row_index;
    companion_catalog_->push_back(std::move(out));
}

void MockGenerator::addResolvedCompanions(const Component& first, const Placement& first_placement,
                                          double age_gyr, std::vector<photometry::CatalogRow>& catalog,
                                          std::vector<ObjectTruth>& truth) {
    const MockSettings& s = settings_;
    if (s.wide_companion_fraction <= 0.0 || companions_.uniform() >= s.wide_companion_fraction) {
        return;
    }
    const int count = companions_.uniform() < s.wide_triple_share ? 2 : 1;
    const double ra = first_placement.ra_deg * kRadiansPerDegree;
    const double dec = first_placement.dec_deg * kRadiansPerDegree;
    const std::array<double, 3> direction = {std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra),
                                             std::sin(dec)};
    double inner_au = kNaN;
    for (int k = 0; k < count; ++k) {
        const double q_min = std::min(1.0, s.imf.mass_min_msun / first.initial_mass_msun);
        const double q = q_min + (1.0 - q_min) * companions_.uniform();
        const Component companion = makeComponent(q * first.initial_mass_msun, age_gyr, companions_);
        const double system_mass_msun = first.mass_msun + companion.mass_msun;
        // Kepler's third law: a [au] = (P [yr])^(2/3) (M [Msun])^(1/3); wider than the tidal limit, or
        // (triples) within a factor 3 of the inner orbit (hierarchical stability; common practice, no
        // source), is drawn again.
        double semi_major_au = kNaN;
        for (int attempt = 0; attempt < 100; ++attempt) {
            const double log_period_day =
                s.wide_log_period_mean_day + s.wide_log_period_sigma_dex * companions_.normal();
            const double period_yr = std::pow(10.0, log_period_day) / 365.25;
            const double a_au = std::pow(period_yr, 2.0 / 3.0) * std::cbrt(system_mass_msun);
            const bool hierarchical = std::isnan(inner_au) || a_au > 3.0 * inner_au || a_au < inner_au / 3.0;
            if (a_au <= s.wide_max_separation_au && hierarchical) {
                semi_major_au = a_au;
                break;
            }
        }
        // An isotropic orbit normal and phase: the separation along a random unit vector, the velocity along
        // a random unit vector perpendicular to it.
        const std::array<double, 3> along = randomUnitVector(companions_);
        std::array<double, 3> across = randomUnitVector(companions_);
        const double overlap = dot(across, along);
        for (int i = 0; i < 3; ++i) {
            across[i] -= overlap * along[i];
        }
        const double across_norm = std::sqrt(dot(across, across));
        if (companion.compact_remnant || std::isnan(semi_major_au) || !(across_norm > 0.0)) {
            continue;
        }
        const double separation_pc = semi_major_au / kAuPerPc;
        std::array<double, 3> position{};
        for (int i = 0; i < 3; ++i) {
            position[i] = first_placement.distance_pc * direction[i] + separation_pc * along[i];
        }
        const double distance_pc = std::sqrt(dot(position, position));
        // atan2(|p x d|, p . d): accurate for the tightest orbits, where acos(p . d / |p|) rounds to 0.
        const std::array<double, 3> cross = {position[1] * direction[2] - position[2] * direction[1],
                                             position[2] * direction[0] - position[0] * direction[2],
                                             position[0] * direction[1] - position[1] * direction[0]};
        const double angle_rad = std::atan2(std::sqrt(dot(cross, cross)), dot(position, direction));
        const double angle_arcsec = angle_rad / kRadiansPerDegree * 3600.0;
        if (angle_arcsec < s.resolution_limit_arcsec) {
            continue; // would not be resolved: not added
        }
        Placement placement;
        placement.distance_pc = distance_pc;
        placement.age_gyr = age_gyr;
        placement.ra_deg = std::fmod(std::atan2(position[1], position[0]) / kRadiansPerDegree + 360.0, 360.0);
        placement.dec_deg = std::asin(position[2] / distance_pc) / kRadiansPerDegree;
        // Circular speed v = 29.78 km/s sqrt(M / a) (M in Msun, a in au; from memory), seen along the
        // companion's east and north.
        const double speed_km_s = 29.78 * std::sqrt(system_mass_msun / semi_major_au);
        const double cra = std::cos(placement.ra_deg * kRadiansPerDegree);
        const double sra = std::sin(placement.ra_deg * kRadiansPerDegree);
        const double sdec = std::sin(placement.dec_deg * kRadiansPerDegree);
        const double cdec = std::cos(placement.dec_deg * kRadiansPerDegree);
        const std::array<double, 3> east = {-sra, cra, 0.0};
        const std::array<double, 3> north = {-sdec * cra, -sdec * sra, cdec};
        for (int i = 0; i < 3; ++i) {
            across[i] *= speed_km_s / across_norm;
        }
        placement.velocity_ra_km_s = first_placement.velocity_ra_km_s + dot(across, east);
        placement.velocity_dec_km_s = first_placement.velocity_dec_km_s + dot(across, north);
        placement.source_id = mockSourceId(seed_, kCompanionIndexOffset + companions_made_++);
        placement.system_source_id = first_placement.system_source_id;
        placement.resolved_companion = true;
        placement.separation_au = angle_rad * first_placement.distance_pc * kAuPerPc;
        placement.separation_arcsec = angle_arcsec;
        Component no_companion;
        no_companion.compact_remnant = true;
        addObject(companion, no_companion, placement, companions_, catalog, truth);
        inner_au = semi_major_au;
    }
}

bool MockGenerator::next(std::size_t max_systems, std::vector<photometry::CatalogRow>& catalog,
                         std::vector<ObjectTruth>& truth, std::vector<CompanionRow>* companion_catalog) {
    const MockSettings& s = settings_;
    companion_catalog_ = companion_catalog;
    for (std::size_t made = 0; made < max_systems && !done_; ++made) {
        // Poisson process in enclosed volume: exponential gaps of mean 1/density.
        enclosed_volume_pc3_ += -std::log(positions_.uniformOpen()) / s.system_density_per_pc3;
        if (enclosed_volume_pc3_ > volume_max_pc3_) {
            done_ = true;
            break;
        }
        const double distance_pc = std::cbrt(3.0 * enclosed_volume_pc3_ / (4.0 * std::numbers::pi));
        const double ra_deg = 360.0 * positions_.uniform();
        const double dec_deg = std::asin(2.0 * positions_.uniform() - 1.0) * 180.0 / std::numbers::pi;

        const double primary_mass = imf_.sample(properties_);
        const double age_gyr = s.disc_age_gyr * properties_.uniform();
        const bool binary = properties_.uniform() < s.binary_fraction;
        Component primary = makeComponent(primary_mass, age_gyr, properties_);
        Component companion;
        companion.compact_remnant = true; // "no companion"
        if (binary) {
            const double q_min = std::min(1.0, s.imf.mass_min_msun / primary_mass);
            const double q = q_min + (1.0 - q_min) * properties_.uniform();
            companion = makeComponent(q * primary_mass, age_gyr, properties_);
        }
        if (primary.compact_remnant) {
            // An NS/BH is removed; a visible companion becomes the object.
            std::swap(primary, companion);
        }
        if (primary.compact_remnant) {
            ++remnant_only_systems_;
            continue;
        }
        Placement placement;
        placement.distance_pc = distance_pc;
        placement.age_gyr = age_gyr;
        placement.ra_deg = ra_deg;
        placement.dec_deg = dec_deg;
        placement.source_id = mockSourceId(seed_, systems_);
        placement.system_source_id = placement.source_id;
        ++systems_;
        const Component first = primary;
        addObject(primary, companion, placement, properties_, catalog, truth);
        placement.velocity_ra_km_s = truth.back().velocity_ra_km_s;
        placement.velocity_dec_km_s = truth.back().velocity_dec_km_s;
        addResolvedCompanions(first, placement, age_gyr, catalog, truth);
    }
    return !done_;
}

MockResult simulateNeighbourhood(const MockSettings& settings, std::uint64_t seed,
                                 const photometry::ModelPhotometry& photometry) {
    MockResult result;
    result.settings = settings;
    result.seed = seed;
    MockGenerator generator(settings, seed, photometry);
    while (generator.next(100000, result.catalog, result.truth, &result.companion_catalog)) {
    }
    result.remnant_only_systems = generator.remnantOnlySystems();
    return result;
}

MockResult simulateNeighbourhood(const MockSettings& settings, std::uint64_t seed) {
    return simulateNeighbourhood(settings, seed, photometry::shippedModelPhotometry());
}

} // namespace starcensus::census::mock
