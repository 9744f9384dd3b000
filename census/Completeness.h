#pragma once
// How complete a volume-limited sample is, per radius and class, given the survey's apparent-magnitude
// limits. Numerics only (no I/O).
//  - A star of absolute magnitude M is seen between d_min = 10^(0.2 (m_bright - M) + 1) pc and
//    d_max = 10^(0.2 (m_faint - M) + 1) pc; within radius R its effective volume is
//    V_eff = 4/3 pi [min(R, d_max)^3 - min(R, d_min)^3].
//  - The complete absolute-magnitude range at R ends at M_lim = m_faint - 5 log10(R / 10 pc); at the
//    bright end it starts where the unseen inner sphere d < d_min holds at most a set share of V(R).
//  - V/Vmax (Schmidt 1968, ApJ 151, 393): for a complete sample of uniform density V(d)/V_max is
//    uniform on [0, 1], so its mean is 0.5 +- 1/sqrt(12 N); a deficit of distant objects drives it lower.
//  - Cumulative counts N(<r) against uniform r^3 growth: the completeness radius is the largest r up to
//    which the distances inside every r' <= r pass a Kolmogorov-Smirnov test against (d / r')^3 uniform.
#include "census/ClassGroups.h"
#include "photometry/ModelPhotometry.h"
#include "photometry/StellarClass.h"

#include <array>
#include <span>
#include <string>
#include <vector>

namespace starcensus::census {

/// The survey's apparent Gaia G limits (mag).
struct MagnitudeLimits {
    double faint_g_mag = 20.7;
    double bright_g_mag = 3.0;
};

/// Settings of the completeness tests; defaults in brackets with units.
struct CompletenessSettings {
    double faint_limit_g_mag = 20.7;     // survey faint limit, Gaia G (mag; common practice, no source)
    double bright_limit_g_mag = 3.0;     // brighter stars saturate (mag; common practice, no source)
    bool estimate_faint_limit = false;   // take the faint limit from the G histogram instead
    double histogram_bin_mag = 0.1;      // bin of that histogram (mag)
    double turnover_drop_fraction = 0.5; // the limit is where counts fall below this share ...
    double turnover_reference_mag = 1.0; // ... of their mean over the preceding this many mag
    double bright_hole_volume_tolerance = 0.01; // share of V(R) lost inside d_min still called complete
    int radius_grid_steps = 40;                 // radii tested for the completeness radius
    int min_objects_to_test = 5;                // fewer objects inside r' than this always pass
    // Kolmogorov distribution: the 1% critical value of sqrt(N) D is 1.63 (standard table, e.g. Press
    // et al., Numerical Recipes, section 14.3; from memory).
    double ks_critical = 1.63;
    // |V/Vmax - 0.5| beyond this many sigma marks a class incomplete (common practice, no source).
    double v_over_vmax_sigmas = 3.0;
    // M_G ranges of the non-dwarf classes. White dwarfs: 10.0 to 15.8, the faintest of the Reyle et
    // al. 2021 10 pc white dwarfs (M_G 11.0-15.8) and the Montreal DA log g 8 model at 4000 K (15.81)
    // (shared/reference/published-figures.md sections 3 and 7); evolved: around the red clump
    // M_G = 0.495 (Ruiz-Dern et al. 2018), -1 to 2 (common practice, no source).
    std::array<double, 2> white_dwarf_abs_g_mag = {10.0, 15.8};
    std::array<double, 2> evolved_abs_g_mag = {-1.0, 2.0};
};

/// Throws InputError naming the option (--faint-limit, --bright-limit, ...) for a value out of range.
void validateCompletenessSettings(const CompletenessSettings& settings);

/// One star of the sample as the completeness and luminosity-function numerics see it.
struct SampleStar {
    double abs_g_mag = 0.0;
    double distance_pc = 0.0;
    float weight = 1.0f; // membership probability within the radius under study (held as a float, as
                         // PreparedSample::probabilityWithin gives it: 24 bytes a star)
    photometry::Category category = 0;
};

/// Distance (pc) at which a star of abs_g_mag has apparent magnitude apparent_limit_mag.
double limitingDistancePc(double apparent_limit_mag, double abs_g_mag);

/// V_eff (pc^3) of a star of abs_g_mag inside radius_pc between the two limits.
double effectiveVolumePc3(double abs_g_mag, double radius_pc, const MagnitudeLimits& limits);

/// Whether a star of this absolute magnitude at this distance lies within the apparent limits.
bool withinLimits(double abs_g_mag, double distance_pc, const MagnitudeLimits& limits);

/// [bright end, faint end] of the complete M_G range at radius_pc (mag).
std::array<double, 2> completeAbsGRange(double radius_pc, const MagnitudeLimits& limits,
                                        double bright_hole_volume_tolerance);

/// The faint limit as the turnover of the apparent-magnitude histogram: scanning faintward from the
/// median magnitude, the lower edge of the first bin whose count falls below turnover_drop_fraction
/// times the mean count of the preceding turnover_reference_mag. NaN with fewer than 10 magnitudes.
double estimateFaintLimitMag(std::span<const double> g_mag, const CompletenessSettings& settings);

/// [min, max] M_G of every census category: dwarf subtypes from the dwarf locus through
/// `photometry.dwarf(code)` over the subtype [k, k + 1); white dwarfs and evolved from the settings;
/// NaN for unclassified.
std::vector<std::array<double, 2>> categoryAbsGRanges(const photometry::ModelPhotometry& photometry,
                                                      const CompletenessSettings& settings);

struct VOverVmax {
    double mean = 0.0;        // membership-weighted mean of V/Vmax; NaN without members
    double expected = 0.5;    // for a complete, uniform sample
    double sigma = 0.0;       // 1 / sqrt(12 N), N the summed weights
    double n_effective = 0.0; // summed membership weights
};

/// V/Vmax of the group's stars within the apparent limits (V from the inner limit d_min, Vmax to min(R,
/// d_max)).
VOverVmax vOverVmax(std::span<const SampleStar> stars, const ClassGroup& group, double radius_pc,
                    const MagnitudeLimits& limits);

/// The completeness radius (pc) of the group's stars with weight >= 0.5 (see the file comment): a
/// value in (0, radius_pc], radius_pc when the counts are consistent everywhere.
double completenessRadiusPc(std::span<const SampleStar> stars, const ClassGroup& group, double radius_pc,
                            const CompletenessSettings& settings);

struct GroupCompleteness {
    std::string name;
    VOverVmax v_over_vmax;
    double completeness_radius_pc = 0.0;
    std::vector<std::string> subtypes_outside; // dwarf subtypes of the group outside the complete range
    bool outside_range = false; // some of the group's M_G range lies outside the complete range
    bool complete = false;      // inside the range and V/Vmax consistent with 0.5
};

struct RadiusCompleteness {
    double radius_pc = 0.0;
    std::array<double, 2> complete_abs_g_mag{};
    std::vector<GroupCompleteness> groups;
};

/// All completeness figures of one radius; `stars` carry the membership weights of that radius and
/// `ranges` comes from categoryAbsGRanges().
RadiusCompleteness assessCompleteness(std::span<const SampleStar> stars, double radius_pc,
                                      const std::vector<ClassGroup>& groups, const MagnitudeLimits& limits,
                                      const std::vector<std::array<double, 2>>& ranges,
                                      const CompletenessSettings& settings);

} // namespace starcensus::census
