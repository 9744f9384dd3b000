#pragma once
// The luminosity function Phi(M_G) (stars pc^-3 mag^-1) of a volume-limited sample, by the 1/Vmax
// estimator (Schmidt 1968, ApJ 151, 393; Felten 1976, ApJ 207, 700): Phi = sum_k w_k / V_max,k / dM over
// the stars of a bin, with w_k the membership probability and V_max,k the effective volume of star k
// (Completeness.h). Inside the complete range V_max = V(R) and this is the plain density; beyond it the
// 1/Vmax weights correct the magnitude-limited part. Errors: the Gehrels (1986, ApJ 303, 336) Poisson
// interval of the summed weights, scaled to Phi. Main-sequence dwarfs (O-Y, including brown dwarfs),
// white dwarfs and evolved stars each get their own table; unclassified objects none.
#include "census/Completeness.h"

#include <array>
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

namespace starcensus::census {

enum class LfPopulation : std::uint8_t { MainSequence, WhiteDwarf, Evolved };
inline constexpr std::array<const char*, 3> kLfPopulationNames = {"main_sequence", "white_dwarf", "evolved"};

/// The population of a census category; nullopt for unclassified.
std::optional<LfPopulation> populationOfCategory(photometry::Category category);

struct LuminositySettings {
    double bin_width_mag = 0.5;  // bin width in M_G (mag); bin edges are multiples of it
    double abs_g_min_mag = -5.0; // tables span at most this M_G range (mag)
    double abs_g_max_mag = 25.0;
};

/// Throws InputError naming the option (--lf-bin-width) for a value out of range.
void validateLuminositySettings(const LuminositySettings& settings);

struct LfBin {
    LfPopulation population = LfPopulation::MainSequence;
    double abs_g_lo_mag = 0.0;
    double abs_g_hi_mag = 0.0;
    double n_weighted = 0.0;          // summed membership weights of the stars in the bin
    double phi_per_pc3_per_mag = 0.0; // 1/Vmax estimate
    double phi_lo68 = 0.0;            // Gehrels 68% interval (stars pc^-3 mag^-1)
    double phi_hi68 = 0.0;
    bool complete = false; // the whole bin lies inside the complete M_G range
};

/// The three tables, main sequence first, each in increasing M_G. Stars outside the apparent limits
/// are left out (their V_max would be zero); bins run from the brightest to the faintest star of a
/// population, and bins where no star could be seen at all (V_eff = 0 at the bin centre) are dropped.
std::vector<LfBin> estimateLuminosityFunction(std::span<const SampleStar> stars, double radius_pc,
                                              const MagnitudeLimits& limits,
                                              double bright_hole_volume_tolerance,
                                              const LuminositySettings& settings);

} // namespace starcensus::census
