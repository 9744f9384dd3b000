#include "reports/SkyMap.h"

#include <boost/math/special_functions/gamma.hpp>
#include <healpix_cxx/healpix_base.h>
#include <healpix_cxx/pointing.h>
#include <healpix_cxx/vec3.h>

#include <algorithm>
#include <cmath>
#include <numbers>

namespace starcensus::reports {

namespace {

constexpr double kDegree = std::numbers::pi / 180.0;

double wrapDegrees360(double angle_deg) {
    const double wrapped = std::fmod(angle_deg, 360.0);
    return wrapped < 0.0 ? wrapped + 360.0 : wrapped;
}

/// Angle in (-180, 180].
double wrapDegrees180(double angle_deg) {
    const double wrapped = wrapDegrees360(angle_deg);
    return wrapped > 180.0 ? wrapped - 360.0 : wrapped;
}

Healpix_Base ringBase(int nside) {
    return Healpix_Base(nside, RING, SET_NSIDE);
}

struct LonLat {
    double l_deg;
    double b_deg;
};

/// Sutherland-Hodgman clipping of a polygon in (l, b) against the half plane sign * (l - edge) <= 0.
std::vector<LonLat> clipAtLongitude(const std::vector<LonLat>& polygon, double edge_deg, double sign) {
    std::vector<LonLat> clipped;
    const auto inside = [&](const LonLat& p) { return sign * (p.l_deg - edge_deg) <= 0.0; };
    for (std::size_t i = 0; i < polygon.size(); ++i) {
        const LonLat& current = polygon[i];
        const LonLat& next = polygon[(i + 1) % polygon.size()];
        if (inside(current)) {
            clipped.push_back(current);
        }
        if (inside(current) != inside(next)) {
            const double t = (edge_deg - current.l_deg) / (next.l_deg - current.l_deg);
            clipped.push_back({edge_deg, current.b_deg + t * (next.b_deg - current.b_deg)});
        }
    }
    return clipped;
}

/// Projects a polygon, subdividing each edge into steps of at most 1 deg in l and b first: an edge along
/// the cut at l = 180 deg is the curved rim of the map, which a chord between its ends would cut off.
std::vector<ProjectedPoint> project(const std::vector<LonLat>& polygon) {
    constexpr double kMaxStepDeg = 1.0;
    std::vector<ProjectedPoint> points;
    for (std::size_t i = 0; i < polygon.size(); ++i) {
        const LonLat& from = polygon[i];
        const LonLat& to = polygon[(i + 1) % polygon.size()];
        const double span = std::max(std::abs(to.l_deg - from.l_deg), std::abs(to.b_deg - from.b_deg));
        const int steps = std::max(1, static_cast<int>(std::ceil(span / kMaxStepDeg)));
        for (int step = 0; step < steps; ++step) {
            const double t = static_cast<double>(step) / steps;
            points.push_back(hammerAitoff(from.l_deg + t * (to.l_deg - from.l_deg),
                                          from.b_deg + t * (to.b_deg - from.b_deg)));
        }
    }
    return points;
}

} // namespace

const std::array<std::array<double, 3>, 3>& icrsToGalacticMatrix() {
    // A_G' of ESA (1997), The Hipparcos and Tycho Catalogues, Vol. 1, Sect. 1.5.3, Eq. 1.5.11 (values
    // from memory; checked against astropy in tests/reports/SkyMapTest.cpp).
    static const std::array<std::array<double, 3>, 3> matrix = {{
        {-0.0548755604, -0.8734370902, -0.4838350155},
        {+0.4941094279, -0.4448296300, +0.7469822445},
        {-0.8676661490, -0.1980763734, +0.4559837762},
    }};
    return matrix;
}

GalacticPosition galacticFromIcrs(double ra_deg, double dec_deg) {
    const double ra = ra_deg * kDegree;
    const double dec = dec_deg * kDegree;
    const std::array<double, 3> icrs = {std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra),
                                        std::sin(dec)};
    std::array<double, 3> galactic{};
    for (std::size_t i = 0; i < 3; ++i) {
        for (std::size_t j = 0; j < 3; ++j) {
            galactic[i] += icrsToGalacticMatrix()[i][j] * icrs[j];
        }
    }
    const double b = std::atan2(galactic[2], std::hypot(galactic[0], galactic[1]));
    return {wrapDegrees360(std::atan2(galactic[1], galactic[0]) / kDegree), b / kDegree};
}

ProjectedPoint hammerAitoff(double l_deg, double b_deg) {
    // Longitudes already in [-180, 180] are kept, so the two map edges (l = +180 on the left, -180 on
    // the right) stay apart.
    const double lambda = (l_deg >= -180.0 && l_deg <= 180.0 ? l_deg : wrapDegrees180(l_deg)) * kDegree;
    const double phi = b_deg * kDegree;
    const double z = std::sqrt(1.0 + std::cos(phi) * std::cos(lambda / 2.0));
    const double x = 2.0 * std::numbers::sqrt2 * std::cos(phi) * std::sin(lambda / 2.0) / z;
    const double y = std::numbers::sqrt2 * std::sin(phi) / z;
    return {-x, y};
}

PixelCounts countPerPixel(std::span<const GalacticPosition> positions, int nside) {
    const Healpix_Base base = ringBase(nside);
    PixelCounts result{nside, std::vector<std::int64_t>(static_cast<std::size_t>(base.Npix()), 0)};
    for (const auto& position : positions) {
        const pointing direction((90.0 - position.b_deg) * kDegree, wrapDegrees360(position.l_deg) * kDegree);
        ++result.counts[static_cast<std::size_t>(base.ang2pix(direction))];
    }
    return result;
}

int chooseNside(std::int64_t objects, const UniformitySettings& settings) {
    int nside = 1;
    while (nside * 2 <= settings.max_nside &&
           static_cast<double>(objects) / (12.0 * 4.0 * nside * nside) >= settings.min_mean_per_pixel) {
        nside *= 2;
    }
    return nside;
}

UniformityTest testUniformity(const PixelCounts& counts, double significance) {
    UniformityTest test;
    test.nside = counts.nside;
    test.significance = significance;
    test.pixels = static_cast<std::int64_t>(counts.counts.size());
    for (const auto count : counts.counts) {
        test.objects += count;
    }
    test.mean_per_pixel = static_cast<double>(test.objects) / static_cast<double>(test.pixels);
    test.degrees_of_freedom = test.pixels - 1;
    test.expected_empty_pixels = static_cast<double>(test.pixels) * std::exp(-test.mean_per_pixel);
    test.min_count = *std::min_element(counts.counts.begin(), counts.counts.end());
    for (std::size_t pixel = 0; pixel < counts.counts.size(); ++pixel) {
        if (counts.counts[pixel] == 0) {
            test.empty_pixels.push_back(static_cast<int>(pixel));
        }
    }
    if (test.objects == 0) {
        return test; // nothing to test: no evidence either way
    }
    for (const auto count : counts.counts) {
        const double deviation = static_cast<double>(count) - test.mean_per_pixel;
        test.chi_square += deviation * deviation / test.mean_per_pixel;
    }
    test.chi_square_p_value =
        boost::math::gamma_q(0.5 * static_cast<double>(test.degrees_of_freedom), 0.5 * test.chi_square);
    // Poisson CDF: P(N <= k | mu) = Q(k + 1, mu), the regularised upper incomplete gamma function.
    const double single_pixel =
        boost::math::gamma_q(static_cast<double>(test.min_count) + 1.0, test.mean_per_pixel);
    test.deepest_hole_p_value =
        single_pixel >= 1.0 ? 1.0 : -std::expm1(static_cast<double>(test.pixels) * std::log1p(-single_pixel));
    test.uniformity_rejected =
        std::min(test.chi_square_p_value, test.deepest_hole_p_value) < significance / 2.0;
    return test;
}

GalacticPosition pixelCentre(int nside, int pixel) {
    const pointing centre = ringBase(nside).pix2ang(pixel);
    return {wrapDegrees360(centre.phi / kDegree), 90.0 - centre.theta / kDegree};
}

std::vector<std::vector<ProjectedPoint>> projectedPixelOutline(int nside, int pixel, int points_per_edge) {
    std::vector<vec3> corners;
    ringBase(nside).boundaries(pixel, static_cast<tsize>(points_per_edge), corners);
    const double centre_l = wrapDegrees180(pixelCentre(nside, pixel).l_deg);
    // Longitudes unwrapped around the pixel centre, so the polygon is contiguous in l; a vertex on a
    // pole takes the centre's longitude (every longitude is the same point there).
    std::vector<LonLat> polygon;
    double min_l = centre_l;
    double max_l = centre_l;
    for (const auto& corner : corners) {
        const pointing direction(corner);
        const double b_deg = 90.0 - direction.theta / kDegree;
        const bool on_pole = std::abs(b_deg) > 90.0 - 1e-9;
        const double l_deg =
            on_pole ? centre_l : centre_l + wrapDegrees180(direction.phi / kDegree - centre_l);
        polygon.push_back({l_deg, b_deg});
        min_l = std::min(min_l, l_deg);
        max_l = std::max(max_l, l_deg);
    }
    if (max_l <= 180.0 && min_l >= -180.0) {
        return {project(polygon)};
    }
    // The pixel crosses the map edge: cut it there and shift the far piece by a full turn.
    const double shift = max_l > 180.0 ? -360.0 : 360.0;
    std::vector<LonLat> shifted = polygon;
    for (auto& vertex : shifted) {
        vertex.l_deg += shift;
    }
    std::vector<std::vector<ProjectedPoint>> pieces;
    const auto near_side =
        max_l > 180.0 ? clipAtLongitude(polygon, 180.0, +1.0) : clipAtLongitude(polygon, -180.0, -1.0);
    const auto far_side =
        max_l > 180.0 ? clipAtLongitude(shifted, -180.0, -1.0) : clipAtLongitude(shifted, 180.0, +1.0);
    for (const auto* piece : {&near_side, &far_side}) {
        if (piece->size() >= 3) {
            pieces.push_back(project(*piece));
        }
    }
    return pieces;
}

} // namespace starcensus::reports
