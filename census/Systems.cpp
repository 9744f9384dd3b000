#include "census/Systems.h"

#include "census/detail/PairSearch.h"
#include "census/detail/SkyGeometry.h"
#include "photometry/base/OptionChecks.h"
#include "photometry/base/Threads.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <numeric>
#include <optional>
#include <stdexcept>
#include <tuple>

namespace starcensus::census {

namespace {

using detail::findRoot;
using detail::kArcsecPerRadian;
using detail::kRadiansPerDegree;
using detail::UnitVector;
using photometry::CatalogRow;

constexpr double kAuPerPc = 206264.806;
// v_t [km/s] = 4.74047 mu [arcsec/yr] d [pc] (IAU 2012 au, Julian year).
constexpr double kKmPerSecondPerAuPerYear = 4.74047;
// Escape speed at 1 au from 1 Msun: sqrt(2 G Msun / au) = sqrt(2) x 29.78 km/s (from memory).
constexpr double kEscapeSpeedAtAuKmPerS = 42.122;
// Cells of the chance-alignment estimate: log10 projected separation (au) from 0 in steps of 0.5 dex, and
// dmu / allowed dmu in quarters (common practice, no source: a few pairs per cell in a 10^4-object sample).
constexpr double kLogSeparationStepDex = 0.5;
constexpr int kSeparationCells = 12; // 1 au .. 10^6 au, past 1 pc = 2.06e5 au
constexpr int kMotionCells = 4;
constexpr int kChanceCells = kSeparationCells * kMotionCells;

bool usable(const CatalogRow& row) {
    return std::isfinite(row.ra_deg) && std::isfinite(row.dec_deg) && row.parallax_mas > 0.0 &&
           std::isfinite(row.pmra_mas_per_yr) && std::isfinite(row.pmdec_mas_per_yr);
}

/// What the pair tests read of a row, copied once so the search walks its targets in memory order
/// instead of fetching a whole CatalogRow per neighbour.
struct PairInputs {
    double parallax_mas;
    double parallax_error_mas;        // as catalogued (NaN or <= 0 when unknown)
    double scaled_parallax_error_mas; // errorOrZero(parallax_error_mas) * errorScale
    double pmra_mas_per_yr;
    double pmdec_mas_per_yr;
};

/// Error-weighted mean parallax of two rows (mas); the plain mean without errors.
double pairParallaxMas(const PairInputs& a, const PairInputs& b) {
    const bool weighted = a.parallax_error_mas > 0.0 && b.parallax_error_mas > 0.0;
    if (!weighted) {
        return 0.5 * (a.parallax_mas + b.parallax_mas);
    }
    const double wa = 1.0 / (a.parallax_error_mas * a.parallax_error_mas);
    const double wb = 1.0 / (b.parallax_error_mas * b.parallax_error_mas);
    return (wa * a.parallax_mas + wb * b.parallax_mas) / (wa + wb);
}

double errorOrZero(double error) {
    return std::isfinite(error) && error > 0.0 ? error : 0.0;
}

/// The factor on a row's errors: its RUWE where above 1 (SystemSettings::inflate_errors_by_ruwe).
double errorScale(const CatalogRow& row, const SystemSettings& s) {
    return s.inflate_errors_by_ruwe && row.ruwe > 1.0 ? row.ruwe : 1.0;
}

PairInputs pairInputs(const CatalogRow& row, const SystemSettings& s) {
    return {row.parallax_mas, row.parallax_error_mas,
            errorOrZero(row.parallax_error_mas) * errorScale(row, s), row.pmra_mas_per_yr,
            row.pmdec_mas_per_yr};
}

/// The tests of Systems.h on one pair at angle separation_rad; nullopt if it fails one.
std::optional<SystemPair> candidatePair(const PairInputs& a, const PairInputs& b, double separation_rad,
                                        const SystemSettings& s) {
    const double parallax_mas = pairParallaxMas(a, b);
    const double distance_pc = 1000.0 / parallax_mas;
    const double projected_pc = separation_rad * distance_pc;
    if (projected_pc > s.max_projected_separation_pc) {
        return std::nullopt;
    }
    const double close_factor =
        separation_rad * kArcsecPerRadian < s.close_pair_arcsec ? s.close_pair_error_factor : 1.0;
    const double to_proper_motion = 1000.0 / (kKmPerSecondPerAuPerYear * distance_pc); // mas/yr per km/s
    const double projected_au = projected_pc * kAuPerPc;
    const double escape_mas_per_yr = kEscapeSpeedAtAuKmPerS *
                                     std::sqrt(s.max_total_mass_msun / std::max(projected_au, 1e-3)) *
                                     to_proper_motion;
    const double pm_difference_ra = a.pmra_mas_per_yr - b.pmra_mas_per_yr;
    const double pm_difference_dec = a.pmdec_mas_per_yr - b.pmdec_mas_per_yr;
    // Most candidates are chance alignments whose proper motions differ by far more than the test below
    // allows: refused here against an upper bound of what it allows, with |x| + |y| >= hypot(x, y) for
    // each of its three hypot calls (a margin covers rounding; NaNs refuse nothing and go on).
    const double allowed_bound =
        escape_mas_per_yr +
        separation_rad * (0.5 * (std::abs(a.pmra_mas_per_yr + b.pmra_mas_per_yr) +
                                 std::abs(a.pmdec_mas_per_yr + b.pmdec_mas_per_yr)) +
                          std::abs(s.max_radial_velocity_km_s) * to_proper_motion) +
        std::abs(s.proper_motion_sigma * s.proper_motion_error_per_parallax_error * close_factor) *
            (a.scaled_parallax_error_mas + b.scaled_parallax_error_mas);
    if (pm_difference_ra * pm_difference_ra + pm_difference_dec * pm_difference_dec >
        allowed_bound * allowed_bound * (1.0 + 1e-9)) {
        return std::nullopt;
    }
    const double parallax_error_mas =
        close_factor * std::hypot(a.scaled_parallax_error_mas, b.scaled_parallax_error_mas);
    // A radial separation r s at distance d changes the parallax by plx^2 r s / 1000 (mas; s in pc).
    const double depth_mas =
        parallax_mas * parallax_mas * s.radial_to_projected_ratio * projected_pc / 1000.0;
    if (std::abs(a.parallax_mas - b.parallax_mas) >
        s.parallax_consistency_sigma * parallax_error_mas + depth_mas) {
        return std::nullopt;
    }
    // One space velocity seen in two directions theta apart differs by up to |v| theta (v in proper-motion
    // units: the mean proper motion and the largest radial velocity assumed).
    const double mean_pm =
        0.5 * std::hypot(a.pmra_mas_per_yr + b.pmra_mas_per_yr, a.pmdec_mas_per_yr + b.pmdec_mas_per_yr);
    const double perspective_mas_per_yr =
        separation_rad * std::hypot(mean_pm, s.max_radial_velocity_km_s * to_proper_motion);
    // Two axes, two stars: sigma of |dmu| per axis is the hypot of the two stars' errors.
    const double pm_error = s.proper_motion_error_per_parallax_error * parallax_error_mas;
    const double allowed = escape_mas_per_yr + perspective_mas_per_yr + s.proper_motion_sigma * pm_error;
    const double difference = std::hypot(pm_difference_ra, pm_difference_dec);
    if (difference > allowed) {
        return std::nullopt;
    }
    SystemPair pair;
    pair.separation_arcsec = separation_rad * kArcsecPerRadian;
    pair.projected_separation_au = projected_au;
    pair.proper_motion_difference_mas_per_yr = difference;
    pair.allowed_proper_motion_difference_mas_per_yr = allowed;
    return pair;
}

int chanceCell(const SystemPair& pair) {
    const int separation_cell =
        std::clamp(static_cast<int>(std::floor(std::log10(std::max(pair.projected_separation_au, 1.0)) /
                                               kLogSeparationStepDex)),
                   0, kSeparationCells - 1);
    const double motion = pair.proper_motion_difference_mas_per_yr /
                          std::max(pair.allowed_proper_motion_difference_mas_per_yr, 1e-30);
    const int motion_cell = std::clamp(static_cast<int>(motion * kMotionCells), 0, kMotionCells - 1);
    return separation_cell * kMotionCells + motion_cell;
}

/// Candidate pairs (query row i, target row j) with the target positions `targets`: each unordered pair
/// once, searched from its member with the larger parallax (ties: the lower index), whose search radius
/// covers the pair (the pair's mean parallax is not larger). The HEALPix grid is sized for the median
/// search radius, and coarser where that would give more pixels than 4 per target (which pixels are
/// visited changes no result: the query is inclusive and every neighbour's angle is tested).
std::vector<SystemPair> searchPairs(const std::vector<PairInputs>& inputs,
                                    const std::vector<std::uint32_t>& usable_rows,
                                    const std::vector<UnitVector>& positions,
                                    const std::vector<UnitVector>& targets, const SystemSettings& s) {
    if (usable_rows.empty()) {
        return {};
    }
    const double cap_rad = s.max_search_angle_deg * kRadiansPerDegree;
    auto searchRadius = [&](double parallax_mas) {
        return std::min(cap_rad, s.max_projected_separation_pc * parallax_mas / 1000.0);
    };
    std::vector<double> radii;
    radii.reserve(usable_rows.size());
    for (const std::uint32_t row : usable_rows) {
        radii.push_back(searchRadius(inputs[row].parallax_mas));
    }
    std::nth_element(radii.begin(), radii.begin() + static_cast<std::ptrdiff_t>(radii.size() / 2),
                     radii.end());
    auto grid = detail::neighbourGrid(radii[radii.size() / 2]);
    constexpr std::int64_t kMaxPixelsPerTarget = 4;
    while (grid.Order() > 0 &&
           grid.Npix() > kMaxPixelsPerTarget * static_cast<std::int64_t>(usable_rows.size())) {
        grid = T_Healpix_Base<std::int64_t>(grid.Order() - 1, RING);
    }
    // The targets in pixel order, within a pixel by decreasing parallax (then ascending row), each with
    // what the pair tests read; where each pixel's targets start, and the largest scaled parallax error
    // among them: the inner loop walks memory in order and stops at the pixel's last parallax that can
    // still pass the parallax test.
    struct Target {
        UnitVector position;
        PairInputs pair_inputs;
        std::uint32_t row;
    };
    const auto npix = static_cast<std::size_t>(grid.Npix());
    std::vector<std::int64_t> pixel_of(usable_rows.size());
    std::vector<std::uint32_t> first_target(npix + 1, 0);
    std::vector<double> largest_error_mas(npix, 0.0);
    for (std::size_t k = 0; k < usable_rows.size(); ++k) {
        const std::uint32_t row = usable_rows[k];
        const UnitVector& u = targets[row];
        pixel_of[k] = grid.vec2pix(vec3(u.x, u.y, u.z));
        const auto pixel = static_cast<std::size_t>(pixel_of[k]);
        ++first_target[pixel + 1];
        // A NaN error fails no parallax test in candidatePair: it widens the pixel's reach to everything.
        const double error_mas = inputs[row].scaled_parallax_error_mas;
        largest_error_mas[pixel] = std::isnan(error_mas) ? std::numeric_limits<double>::infinity()
                                                         : std::max(largest_error_mas[pixel], error_mas);
    }
    std::partial_sum(first_target.begin(), first_target.end(), first_target.begin());
    std::vector<Target> by_pixel(usable_rows.size());
    {
        std::vector<std::uint32_t> next(first_target.begin(), first_target.end() - 1);
        for (std::size_t k = 0; k < usable_rows.size(); ++k) {
            const std::uint32_t row = usable_rows[k];
            by_pixel[next[static_cast<std::size_t>(pixel_of[k])]++] = {targets[row], inputs[row], row};
        }
    }
    const auto nearerFirst = [](const Target& x, const Target& y) {
        return x.pair_inputs.parallax_mas > y.pair_inputs.parallax_mas ||
               (x.pair_inputs.parallax_mas == y.pair_inputs.parallax_mas && x.row < y.row);
    };
    for (std::size_t pixel = 0; pixel < npix; ++pixel) {
        std::sort(by_pixel.begin() + first_target[pixel], by_pixel.begin() + first_target[pixel + 1],
                  nearerFirst);
    }
    // The parallax test of candidatePair passes only if |dplx| <= k f hypot(err_a, err_b) + plx^2 q s / 1000
    // with f the close-pair factor (or 1), s <= the largest projected separation and plx, the pair's mean,
    // at most a's (the larger). A margin covers rounding; a NaN bound prunes nothing.
    const double error_factor = s.parallax_consistency_sigma * std::max(1.0, s.close_pair_error_factor);
    const double depth_factor = s.radial_to_projected_ratio * s.max_projected_separation_pc / 1000.0;
    constexpr double kRelativeMargin = 1e-9;
    // Per neighbour, candidatePair's own factor: the close-pair factor only within close_pair_arcsec (a
    // chord up to a hair beyond that angle's is taken as close), so most pairs are held to k sigma, not
    // k f sigma.
    const double close_half_chord = std::sin(0.5 * s.close_pair_arcsec / kArcsecPerRadian);
    const double close_chord_squared_limit =
        4.0 * close_half_chord * close_half_chord * (1.0 + kRelativeMargin);
    const double close_factor_squared = error_factor * error_factor;
    const double plain_factor_squared = s.parallax_consistency_sigma * s.parallax_consistency_sigma;
    // The parallaxes alone as well, for the search of where a pixel's usable targets start and stop.
    std::vector<double> parallax_by_pixel(by_pixel.size());
    std::transform(by_pixel.begin(), by_pixel.end(), parallax_by_pixel.begin(),
                   [](const Target& t) { return t.pair_inputs.parallax_mas; });
    // Queries in the pixel order of their positions, with their own inputs: neighbouring queries read the
    // same targets, which stay in cache (the pairs are sorted at the end, so the order changes nothing).
    std::vector<std::pair<std::int64_t, std::uint32_t>> query_order;
    query_order.reserve(usable_rows.size());
    for (const std::uint32_t row : usable_rows) {
        const UnitVector& u = positions[row];
        query_order.emplace_back(grid.vec2pix(vec3(u.x, u.y, u.z)), row);
    }
    std::sort(query_order.begin(), query_order.end());
    std::vector<Target> queries;
    queries.reserve(query_order.size());
    for (const auto& [pixel, row] : query_order) {
        queries.push_back({positions[row], inputs[row], row});
    }
    const unsigned workers = resolveThreadCount(s.threads);
    std::vector<std::vector<SystemPair>> found(workers);
    std::vector<rangeset<std::int64_t>> pixel_sets(workers); // reused: each query clears its set
    forEachIndex(queries.size(), s.threads, [&](std::size_t k, unsigned worker) {
        const std::uint32_t i = queries[k].row;
        const PairInputs& a = queries[k].pair_inputs;
        const UnitVector& position = queries[k].position;
        const double radius_rad = searchRadius(a.parallax_mas);
        rangeset<std::int64_t>& pixels = pixel_sets[worker];
        grid.query_disc_inclusive(detail::toPointing(position), radius_rad, pixels);
        const double depth_mas = a.parallax_mas * a.parallax_mas * depth_factor;
        // Cheap necessary conditions, tested before the angle and candidatePair, with no square root or
        // arcsine: the chord |u - v| of a neighbour within radius_rad is at most 2 sin(radius_rad / 2);
        // and it fails the parallax test when dplx - depth > k f hypot(err_a, err_b), squared (f = 1
        // beyond close_pair_arcsec).
        const double half_chord = std::sin(0.5 * radius_rad);
        const double chord_squared_limit = 4.0 * half_chord * half_chord * (1.0 + kRelativeMargin);
        const double reach_depth_mas = depth_mas * (1.0 + kRelativeMargin);
        const double error_a_squared_mas2 = a.scaled_parallax_error_mas * a.scaled_parallax_error_mas;
        for (std::size_t r = 0; r < pixels.nranges(); ++r) {
            for (auto pixel = static_cast<std::size_t>(pixels.ivbegin(r));
                 pixel < static_cast<std::size_t>(pixels.ivend(r)); ++pixel) {
                if (first_target[pixel] == first_target[pixel + 1]) {
                    continue;
                }
                const double error_squared_mas2 = a.scaled_parallax_error_mas * a.scaled_parallax_error_mas +
                                                  largest_error_mas[pixel] * largest_error_mas[pixel];
                const double reach_mas =
                    (error_factor * std::sqrt(error_squared_mas2) + depth_mas) * (1.0 + kRelativeMargin);
                const double lowest_parallax_mas = a.parallax_mas - reach_mas;
                const double* const parallaxes = parallax_by_pixel.data();
                const double* const pixel_end = parallaxes + first_target[pixel + 1];
                const double* first = std::partition_point(parallaxes + first_target[pixel], pixel_end,
                                                           [&](double x) { return x > a.parallax_mas; });
                const double* last = first;
                while (last != pixel_end && !(*last < lowest_parallax_mas)) {
                    ++last;
                }
                for (const Target *t = by_pixel.data() + (first - parallaxes),
                                  *end = by_pixel.data() + (last - parallaxes);
                     t != end; ++t) {
                    const std::uint32_t j = t->row;
                    const PairInputs& b = t->pair_inputs;
                    if (j == i || (b.parallax_mas == a.parallax_mas && j < i)) {
                        continue;
                    }
                    const double chord_squared = detail::chordSquared(position, t->position);
                    if (chord_squared > chord_squared_limit) {
                        continue;
                    }
                    const double factor_squared = chord_squared <= close_chord_squared_limit
                                                      ? close_factor_squared
                                                      : plain_factor_squared;
                    const double excess_mas = (a.parallax_mas - b.parallax_mas) - reach_depth_mas;
                    if (excess_mas > 0.0 && excess_mas * excess_mas >
                                                factor_squared *
                                                    (error_a_squared_mas2 + b.scaled_parallax_error_mas *
                                                                                b.scaled_parallax_error_mas) *
                                                    (1.0 + kRelativeMargin)) {
                        continue;
                    }
                    const double separation_rad = detail::separationRadians(position, t->position);
                    if (separation_rad > radius_rad) {
                        continue;
                    }
                    if (auto pair = candidatePair(a, b, separation_rad, s)) {
                        pair->a = std::min(i, j);
                        pair->b = std::max(i, j);
                        found[worker].push_back(*pair);
                    }
                }
            }
        }
    });
    std::vector<SystemPair> pairs = detail::joinParts(found);
    std::sort(pairs.begin(), pairs.end(), [](const SystemPair& x, const SystemPair& y) {
        return std::tie(x.a, x.b) < std::tie(y.a, y.b);
    });
    return pairs;
}

/// The positions displaced by shift_deg: along the parallel (ra += shift / cos dec) within 60 deg of the
/// equator, towards the equator by |shift| beyond, so every object moves by about |shift| and the sky
/// density around it stays what it was.
std::vector<UnitVector> shiftedSky(std::span<const CatalogRow> rows, double shift_deg) {
    constexpr double kPolarCapDeg = 60.0;
    std::vector<UnitVector> shifted(rows.size());
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const CatalogRow& row = rows[i];
        double ra_deg = row.ra_deg;
        double dec_deg = row.dec_deg;
        if (std::abs(dec_deg) <= kPolarCapDeg) {
            ra_deg += shift_deg / std::cos(dec_deg * kRadiansPerDegree);
        } else {
            dec_deg -= std::copysign(std::abs(shift_deg), dec_deg);
        }
        shifted[i] = detail::unitVectorOf(ra_deg, dec_deg);
    }
    return shifted;
}

/// True if row x should be the primary rather than row y: more massive; without masses (or equal),
/// brighter in G; then the lower index.
bool outranks(std::span<const CatalogRow> rows, std::span<const double> masses_msun, std::uint32_t x,
              std::uint32_t y) {
    const double mx = std::isnan(masses_msun[x]) ? -1.0 : masses_msun[x];
    const double my = std::isnan(masses_msun[y]) ? -1.0 : masses_msun[y];
    if (mx != my) {
        return mx > my;
    }
    const double gx = std::isnan(rows[x].g_mag) ? 99.0 : rows[x].g_mag;
    const double gy = std::isnan(rows[y].g_mag) ? 99.0 : rows[y].g_mag;
    if (gx != gy) {
        return gx < gy;
    }
    return x < y;
}

} // namespace

void validateSystemSettings(const SystemSettings& s) {
    requireInRange("system-separation-max", s.max_projected_separation_pc, 0.0, 10.0, "pc",
                   LowerBound::Exclusive);
    requireInRange("system-search-angle-max", s.max_search_angle_deg, 0.0, 30.0, "deg",
                   LowerBound::Exclusive);
    requireInRange("system-sky-shift", s.sky_shift_deg, s.max_search_angle_deg, 90.0, "deg",
                   LowerBound::Exclusive);
    requireInRange("system-chance-max", s.max_chance_probability, 0.0, 1.0, "");
    requireInRange("system-ruwe", s.unresolved_ruwe, 1.0, 100.0, "");
    requireThat(s.sky_shifts >= 1 && s.sky_shifts <= 16, "system-sky-shifts", "must be in [1, 16]");
}

SystemCatalog findSystems(std::span<const CatalogRow> rows, std::span<const double> masses_msun,
                          std::span<const std::uint8_t> above_binary_band, const SystemSettings& s) {
    validateSystemSettings(s);
    if (masses_msun.size() != rows.size() || above_binary_band.size() != rows.size()) {
        throw std::invalid_argument("findSystems: one mass and one binary-band flag per row");
    }
    const auto n = static_cast<std::uint32_t>(rows.size());
    std::vector<std::uint32_t> usable_rows;
    std::vector<UnitVector> positions(n);
    for (std::uint32_t i = 0; i < n; ++i) {
        if (usable(rows[i])) {
            usable_rows.push_back(i);
            positions[i] = detail::unitVectorOf(rows[i].ra_deg, rows[i].dec_deg);
        }
    }
    std::vector<PairInputs> pair_inputs(n);
    for (std::uint32_t i = 0; i < n; ++i) {
        pair_inputs[i] = pairInputs(rows[i], s);
    }
    SystemCatalog result;
    result.pairs = searchPairs(pair_inputs, usable_rows, positions, positions, s);

    // Shifted skies: +1, -1, +2, -2, ... times sky_shift_deg.
    std::array<double, kChanceCells> shifted_counts{};
    for (int k = 0; k < s.sky_shifts; ++k) {
        const double shift_deg = s.sky_shift_deg * (k / 2 + 1) * (k % 2 == 0 ? 1.0 : -1.0);
        for (const SystemPair& pair :
             searchPairs(pair_inputs, usable_rows, positions, shiftedSky(rows, shift_deg), s)) {
            shifted_counts[static_cast<std::size_t>(chanceCell(pair))] += 1.0;
        }
    }
    std::array<double, kChanceCells> real_counts{};
    for (const SystemPair& pair : result.pairs) {
        real_counts[static_cast<std::size_t>(chanceCell(pair))] += 1.0;
    }
    result.shifted_pairs_per_sky =
        std::accumulate(shifted_counts.begin(), shifted_counts.end(), 0.0) / s.sky_shifts;

    result.flags.assign(n, 0);
    for (std::uint32_t i = 0; i < n; ++i) {
        if (rows[i].ruwe > s.unresolved_ruwe) {
            result.flags[i] |= SystemFlagHighRuwe;
        }
        if (above_binary_band[i] != 0) {
            result.flags[i] |= SystemFlagAboveBinaryBand;
        }
    }
    std::vector<std::uint32_t> parent(n);
    std::iota(parent.begin(), parent.end(), 0u);
    for (SystemPair& pair : result.pairs) {
        const auto cell = static_cast<std::size_t>(chanceCell(pair));
        pair.chance_probability = std::min(1.0, shifted_counts[cell] / s.sky_shifts / real_counts[cell]);
        pair.joined = pair.chance_probability <= s.max_chance_probability;
        if (pair.joined) {
            parent[findRoot(parent, pair.b)] = findRoot(parent, pair.a);
        } else {
            result.flags[pair.a] |= SystemFlagChanceRejected;
            result.flags[pair.b] |= SystemFlagChanceRejected;
        }
    }

    // Systems in order of their lowest row: the first row met of each root opens it.
    std::size_t system_count = 0;
    for (std::uint32_t i = 0; i < n; ++i) {
        system_count += findRoot(parent, i) == i ? 1 : 0;
    }
    result.systems.reserve(system_count); // one allocation: a system per object is the usual case
    std::vector<std::int64_t> system_of_root(n, -1);
    for (std::uint32_t i = 0; i < n; ++i) {
        const std::uint32_t root = findRoot(parent, i);
        if (system_of_root[root] < 0) {
            system_of_root[root] = static_cast<std::int64_t>(result.systems.size());
            result.systems.emplace_back();
        }
        result.systems[static_cast<std::size_t>(system_of_root[root])].members.push_back(i);
    }
    std::vector<double> largest_chance(result.systems.size(), 0.0);
    for (const SystemPair& pair : result.pairs) {
        if (pair.joined) {
            double& largest =
                largest_chance[static_cast<std::size_t>(system_of_root[findRoot(parent, pair.a)])];
            largest = std::max(largest, pair.chance_probability);
        }
    }
    result.system_ids.assign(n, 0);
    result.roles.assign(n, SystemRole::Single);
    for (std::size_t k = 0; k < result.systems.size(); ++k) {
        StellarSystem& system = result.systems[k];
        system.id = static_cast<std::int64_t>(k) + 1;
        system.largest_chance_probability = largest_chance[k];
        system.primary = *std::min_element(
            system.members.begin(), system.members.end(),
            [&](std::uint32_t x, std::uint32_t y) { return outranks(rows, masses_msun, x, y); });
        const UnitVector& primary_position = positions[system.primary];
        auto angleFromPrimary = [&](std::uint32_t member) {
            return member == system.primary ? 0.0
                                            : detail::separationRadians(primary_position, positions[member]);
        };
        std::stable_sort(system.members.begin(), system.members.end(), [&](std::uint32_t x, std::uint32_t y) {
            return angleFromPrimary(x) < angleFromPrimary(y);
        });
        for (const std::uint32_t member : system.members) {
            if (rows[member].literature_components > static_cast<double>(system.members.size())) {
                result.flags[member] |= SystemFlagLiteratureMultiple;
            }
            const double angle_rad = angleFromPrimary(member);
            const double separation_au = angle_rad * 1000.0 /
                                         pairParallaxMas(pair_inputs[system.primary], pair_inputs[member]) *
                                         kAuPerPc;
            if (separation_au > system.widest_separation_au) {
                system.widest_separation_au = separation_au;
                system.widest_separation_arcsec = angle_rad * kArcsecPerRadian;
            }
            system.flags |= result.flags[member];
            result.system_ids[member] = system.id;
            if (system.members.size() > 1) {
                result.roles[member] = member == system.primary ? SystemRole::Primary : SystemRole::Companion;
            }
        }
    }
    return result;
}

} // namespace starcensus::census
