#include "reports/SkyMap.h"

#include <healpix_cxx/healpix_base.h>
#include <healpix_cxx/pointing.h>
#include <healpix_cxx/vec3.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

namespace starcensus::reports {

namespace {

using census::wrapDegrees360;

constexpr double kDegree = std::numbers::pi / 180.0;

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

std::optional<GalacticPosition> inverseHammerAitoff(ProjectedPoint point) {
    const double x = -point.x; // the projection's own orientation (l increasing to the right)
    const double y = point.y;
    const double ellipse = x * x / 8.0 + y * y / 2.0;
    if (ellipse > 1.0) {
        return std::nullopt;
    }
    const double z = std::sqrt(1.0 - ellipse / 2.0); // sqrt(1 - (x/4)^2 - (y/2)^2), at least sqrt(1/2)
    const double lambda = 2.0 * std::atan2(z * x, 2.0 * (2.0 * z * z - 1.0));
    return GalacticPosition{lambda / kDegree, std::asin(std::clamp(z * y, -1.0, 1.0)) / kDegree};
}

std::vector<double> projectedPixelCounts(const census::PixelCounts& counts, const GridAxes& axes) {
    const Healpix_Base base = ringBase(counts.nside);
    std::vector<double> image(static_cast<std::size_t>(axes.nx) * static_cast<std::size_t>(axes.ny),
                              std::numeric_limits<double>::quiet_NaN());
    const double cell_x = (axes.x_max - axes.x_min) / axes.nx;
    const double cell_y = (axes.y_max - axes.y_min) / axes.ny;
    for (int ix = 0; ix < axes.nx; ++ix) {
        for (int iy = 0; iy < axes.ny; ++iy) {
            const auto position =
                inverseHammerAitoff({axes.x_min + (ix + 0.5) * cell_x, axes.y_min + (iy + 0.5) * cell_y});
            if (position) {
                const pointing direction((90.0 - position->b_deg) * kDegree,
                                         wrapDegrees360(position->l_deg) * kDegree);
                image[static_cast<std::size_t>(ix) * static_cast<std::size_t>(axes.ny) +
                      static_cast<std::size_t>(iy)] =
                    static_cast<double>(counts.counts[static_cast<std::size_t>(base.ang2pix(direction))]);
            }
        }
    }
    return image;
}

std::vector<std::vector<ProjectedPoint>> projectedPixelOutline(int nside, int pixel, int points_per_edge) {
    std::vector<vec3> corners;
    ringBase(nside).boundaries(pixel, static_cast<tsize>(points_per_edge), corners);
    const double centre_l = wrapDegrees180(census::pixelCentre(nside, pixel).l_deg);
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
