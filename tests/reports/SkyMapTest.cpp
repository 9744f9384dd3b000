#include "reports/SkyMap.h"

#include <doctest/doctest.h>

#include <cmath>
#include <numbers>

using namespace starcensus::reports;

namespace {

double polygonArea(const std::vector<ProjectedPoint>& polygon) {
    double twice_area = 0.0;
    for (std::size_t i = 0; i < polygon.size(); ++i) {
        const auto& a = polygon[i];
        const auto& b = polygon[(i + 1) % polygon.size()];
        twice_area += a.x * b.y - b.x * a.y;
    }
    return std::abs(0.5 * twice_area);
}

} // namespace

TEST_CASE("Hammer-Aitoff: edges, orientation and equal area of the HEALPix pixels") {
    CHECK(hammerAitoff(0.0, 0.0).x == doctest::Approx(0.0));
    CHECK(hammerAitoff(0.0, 90.0).y == doctest::Approx(std::numbers::sqrt2));
    CHECK(hammerAitoff(180.0, 0.0).x == doctest::Approx(-2.0 * std::numbers::sqrt2)); // l = +180 on the left
    CHECK(hammerAitoff(-180.0, 0.0).x == doctest::Approx(2.0 * std::numbers::sqrt2));
    CHECK(hammerAitoff(90.0, 0.0).x < 0.0); // increasing l to the left
    CHECK(hammerAitoff(270.0, 0.0).x == doctest::Approx(hammerAitoff(-90.0, 0.0).x)); // wrapped
    // An equal-area projection maps the sphere onto 4 pi and each HEALPix pixel onto 4 pi / npix;
    // pixels cut at l = 180 come in two pieces whose areas add up. Tolerance: the polygons are sampled
    // at 16 points per edge, so curved edges are chords (common practice, no source).
    for (const int nside : {1, 2, 4}) {
        const int pixels = 12 * nside * nside;
        double total = 0.0;
        for (int pixel = 0; pixel < pixels; ++pixel) {
            double area = 0.0;
            for (const auto& piece : projectedPixelOutline(nside, pixel, 16)) {
                area += polygonArea(piece);
            }
            CAPTURE(nside);
            CAPTURE(pixel);
            CHECK(area == doctest::Approx(4.0 * std::numbers::pi / pixels).epsilon(0.01));
            total += area;
        }
        CHECK(total == doctest::Approx(4.0 * std::numbers::pi).epsilon(0.003));
    }
}
