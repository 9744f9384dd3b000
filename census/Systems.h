#pragma once
// Stellar systems from the census objects: resolved companions found from positions, parallaxes and
// proper motions, each pair's chance-alignment probability estimated from the sample itself by the
// shifted-sky method, and flags for likely unresolved companions. Pure computation on the cleaned rows;
// the caller supplies each row's mass (census/RowClassification.h) and binary-band flag.
//
// A pair is a candidate when, with d = 1000 / parallax of the pair (its error-weighted mean parallax):
//  - projected separation s = theta d <= max_projected_separation_pc;
//  - |plx_a - plx_b| <= k sqrt(err_a^2 + err_b^2) + plx^2 (r s) / 1000, the second term allowing a radial
//    separation r times the projected one (El-Badry, Rix & Heintz 2021, MNRAS 506, 2269, use the
//    first term alone; the second matters only for wide pairs within a few tens of pc);
//  - |mu_a - mu_b| <= the escape speed at s from total mass max_total_mass_msun, as a proper motion,
//    + the perspective difference of one space velocity over the angle theta, + k sigma_dmu (El-Badry et
//    al. 2021, with the circular speed of 5 Msun; the escape speed is the bound-orbit limit).
// The El-Badry et al. details here (their tests, 5 Msun, R < 0.1, the 1 pc limit) are from memory.
// Chance alignments (Lepine & Bongiorno 2007, AJ 133, 889; El-Badry et al. 2021; from memory): the
// same search between the catalogue and copies of it displaced by sky_shift_deg, where no pair is
// physical, counts the chance pairs per cell of (log projected separation, dmu / allowed dmu); a pair's
// chance-alignment probability is the mean shifted count over the real count in its cell (at most 1).
// Systems are the connected groups of the pairs below max_chance_probability; the primary is the most
// massive member (the brighter in G where masses are missing or tie).
#include "photometry/catalog/CatalogRow.h"

#include <cstdint>
#include <span>
#include <vector>

namespace starcensus::census {

struct SystemSettings {
    // Largest projected separation of a resolved pair (pc). Wide binaries reach ~1 pc; El-Badry et al.
    // 2021 search to 1 pc, where the Galactic tide unbinds them (Jiang & Tremaine 2010; both from memory).
    double max_projected_separation_pc = 1.0;
    // Cap of the search radius (deg), so the few objects within ~10 pc do not query a whole hemisphere.
    // At 5 deg a 1 pc pair is found beyond 11.5 pc; closer, pairs up to 5 deg (Proxima: 2.2 deg).
    double max_search_angle_deg = 5.0;
    double parallax_consistency_sigma = 3.0; // k of the parallax test (dimensionless)
    // Radial separation allowed as a multiple of the projected one (dimensionless): for isotropic
    // orientations 95% of pairs have |cot i| < 3 (1 - cos 18.4 deg = 0.05).
    double radial_to_projected_ratio = 3.0;
    double max_total_mass_msun = 5.0; // for the escape speed (Msun; El-Badry et al. 2021 use 5 Msun)
    double proper_motion_sigma = 3.0; // k of the proper-motion test (dimensionless)
    // Proper-motion error per axis as a multiple of the parallax error (mas/yr per mas): the rows carry
    // no proper-motion errors; in Gaia DR3 the two are about equal (Lindegren et al. 2021, A&A 649, A2,
    // Table 4; from memory).
    double proper_motion_error_per_parallax_error = 1.0;
    // Errors of rows with RUWE > 1 are multiplied by their RUWE: an unresolved companion's photocentre
    // motion enters both the parallax and the proper motion, and the quoted errors do not know it
    // (common practice, no source).
    bool inflate_errors_by_ruwe = true;
    // Errors of both rows of a pair closer than close_pair_arcsec are multiplied by close_pair_error_factor:
    // Gaia DR3 underestimates them for close pairs (El-Badry et al. 2021 loosen the parallax
    // test below ~4 arcsec; from memory).
    double close_pair_arcsec = 4.0;
    double close_pair_error_factor = 2.0;
    // Largest radial velocity assumed in the perspective term (km/s; common practice, no source).
    double max_radial_velocity_km_s = 100.0;
    // The shifted skies: displacements of 1..sky_shifts times sky_shift_deg, alternately east and west
    // (deg); larger than max_search_angle_deg, so no physical pair survives a shift.
    double sky_shift_deg = 12.0;
    int sky_shifts = 4;
    double max_chance_probability = 0.1; // pairs above it are not joined (El-Badry et al. 2021: R < 0.1)
    double unresolved_ruwe = 1.4; // RUWE above this: likely unresolved (Lindegren et al. 2018; from memory)
    unsigned threads = 0;         // as forEachIndex; the result does not depend on it
};

/// Per-object flags (bits).
enum SystemFlag : std::uint8_t {
    SystemFlagHighRuwe = 1u << 0,        // RUWE above unresolved_ruwe: likely an unresolved binary
    SystemFlagAboveBinaryBand = 1u << 1, // the classifier's binary band: likely an unresolved binary
    SystemFlagChanceRejected = 1u << 2,  // has a candidate pair refused for its chance probability
    // The catalogue's multiplicity column (CatalogRow::literature_components) counts more components in
    // the object's system than the system found here has members: likely an unresolved (or unseen)
    // companion.
    SystemFlagLiteratureMultiple = 1u << 3,
};

/// A candidate pair of rows (indices into the input; a < b).
struct SystemPair {
    std::uint32_t a = 0;
    std::uint32_t b = 0;
    double separation_arcsec = 0.0;
    double projected_separation_au = 0.0;
    double proper_motion_difference_mas_per_yr = 0.0;
    double allowed_proper_motion_difference_mas_per_yr = 0.0;
    double chance_probability = 0.0;
    bool joined = false; // chance_probability <= max_chance_probability
};

enum class SystemRole : std::uint8_t { Single, Primary, Companion };

struct StellarSystem {
    std::int64_t id = 0;                // 1-based, in order of the lowest member row
    std::vector<std::uint32_t> members; // row indices: the primary first, then by separation from it
    std::uint32_t primary = 0;
    double widest_separation_au = 0.0;       // largest projected separation from the primary (0: single)
    double widest_separation_arcsec = 0.0;   // the same pair's angle
    double largest_chance_probability = 0.0; // over the pairs that joined it (0: single)
    std::uint8_t flags = 0;                  // union of the members' flags
};

struct SystemCatalog {
    std::vector<StellarSystem> systems;   // every object is in one (singles too)
    std::vector<std::int64_t> system_ids; // [row]
    std::vector<SystemRole> roles;        // [row]
    std::vector<std::uint8_t> flags;      // [row]: SystemFlag bits
    std::vector<SystemPair> pairs;        // every candidate pair, by (a, b)
    double shifted_pairs_per_sky = 0.0;   // mean candidate count in one shifted sky
};

/// Groups the rows into systems. masses_msun[row] (NaN where unknown) picks primaries;
/// above_binary_band[row] != 0 flags the classifier's binary band. Rows without a positive parallax,
/// a position or a proper motion are singles.
SystemCatalog findSystems(std::span<const photometry::CatalogRow> rows, std::span<const double> masses_msun,
                          std::span<const std::uint8_t> above_binary_band, const SystemSettings& settings);

/// Throws InputError naming the option for a bad setting.
void validateSystemSettings(const SystemSettings& settings);

} // namespace starcensus::census
