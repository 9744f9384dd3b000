#pragma once
// Geometry of the report's all-sky map: the Hammer-Aitoff equal-area projection and HEALPix pixel
// outlines in it. The positions, counts and the uniformity test it shows are census/SkyUniformity.h's.
// Nothing here draws or touches files.
#include "census/SkyUniformity.h"
#include "reports/DensityGrid.h"

#include <optional>
#include <vector>

namespace starcensus::reports {

using census::GalacticPosition;

struct ProjectedPoint {
    double x = 0.0; // in [-2 sqrt 2, 2 sqrt 2]; longitude increases to the left (x falls with l)
    double y = 0.0; // in [-sqrt 2, sqrt 2]
};

/// Hammer-Aitoff equal-area projection centred on l = 0 (Calabretta & Greisen 2002, A&A 395, 1077,
/// Sect. 5.3.4, "AIT"; section from memory), with the astronomical orientation (increasing l to the
/// left). Longitudes in [-180, 180] are used as given (so +180 is the left edge, -180 the right), others
/// are wrapped into that range. The whole sphere maps onto an ellipse of area 4 pi.
ProjectedPoint hammerAitoff(double l_deg, double b_deg);

/// The inverse of hammerAitoff: (l in [-180, 180], b) in degrees of a point of the map, none outside the
/// map's ellipse (x^2 / 8 + y^2 / 2 > 1). Calabretta & Greisen (2002), Sect. 5.3.4 (from memory).
std::optional<GalacticPosition> inverseHammerAitoff(ProjectedPoint point);

/// The HEALPix counts as an image of the projected plane: for each cell of `axes` (x-major, as
/// DensityGrid), the count of the pixel under the cell's centre; NaN where the centre is off the map.
std::vector<double> projectedPixelCounts(const census::PixelCounts& counts, const GridAxes& axes);

/// The outline of one pixel in the projected plane, as one polygon, or two where the pixel straddles
/// the l = 180 deg edge of the map (cut there). Edges are sampled at `points_per_edge` points.
std::vector<std::vector<ProjectedPoint>> projectedPixelOutline(int nside, int pixel, int points_per_edge);

} // namespace starcensus::reports
