#include "reports/SkyMap.h"

#include <doctest/doctest.h>

#include <algorithm>
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

TEST_CASE("inverse Hammer-Aitoff: a round trip, and nothing off the map") {
    for (const double l_deg : {-179.0, -120.0, -45.0, 0.0, 30.0, 90.0, 179.0}) {
        for (const double b_deg : {-89.0, -60.0, -10.0, 0.0, 25.0, 75.0}) {
            const auto back = inverseHammerAitoff(hammerAitoff(l_deg, b_deg));
            REQUIRE(back.has_value());
            CAPTURE(l_deg);
            CAPTURE(b_deg);
            CHECK(back->l_deg == doctest::Approx(l_deg).epsilon(1e-9)); // round-off only
            CHECK(back->b_deg == doctest::Approx(b_deg).epsilon(1e-9));
        }
    }
    CHECK_FALSE(inverseHammerAitoff({2.9, 0.0}).has_value()); // beyond x = 2 sqrt 2 on the equator
    CHECK_FALSE(inverseHammerAitoff({0.0, 1.5}).has_value()); // beyond y = sqrt 2
    CHECK(inverseHammerAitoff({2.0, 1.0}).has_value());       // x^2/8 + y^2/2 = 1: on the rim
    CHECK_FALSE(inverseHammerAitoff({2.1, 1.0}).has_value()); // 1.05
}

TEST_CASE("HEALPix counts as an image of the map: the pixel under each cell, the ellipse's area") {
    // Each pixel's count is its own index, so each cell tells which pixel it sampled.
    constexpr int kNside = 8;
    starcensus::census::PixelCounts counts{kNside, {}};
    for (int pixel = 0; pixel < 12 * kNside * kNside; ++pixel) {
        counts.counts.push_back(pixel);
    }
    const GridAxes axes{-3.0, 3.0, 600, -1.5, 1.5, 300};
    const auto image = projectedPixelCounts(counts, axes);
    REQUIRE(image.size() == 600u * 300u);
    std::size_t on_map = 0;
    for (int ix = 0; ix < axes.nx; ++ix) {
        for (int iy = 0; iy < axes.ny; ++iy) {
            const double value = image[static_cast<std::size_t>(ix) * 300u + static_cast<std::size_t>(iy)];
            if (std::isnan(value)) {
                continue;
            }
            ++on_map;
            const auto centre = inverseHammerAitoff({-3.0 + (ix + 0.5) * 0.01, -1.5 + (iy + 0.5) * 0.01});
            REQUIRE(centre.has_value());
            // The sampled pixel contains the cell centre: its own centre lies within the pixel's size
            // (~sqrt(4 pi / 768) rad = 7.3 deg across at nside 8; the farthest corner ~5.2 deg, from memory
            // of the HEALPix pixel shapes; 8 deg allowed).
            const auto pixel = starcensus::census::pixelCentre(kNside, static_cast<int>(value));
            const double to_rad = std::numbers::pi / 180.0;
            const double cos_separation = std::sin(centre->b_deg * to_rad) * std::sin(pixel.b_deg * to_rad) +
                                          std::cos(centre->b_deg * to_rad) * std::cos(pixel.b_deg * to_rad) *
                                              std::cos((centre->l_deg - pixel.l_deg) * to_rad);
            CHECK(std::acos(std::min(1.0, cos_separation)) / to_rad < 8.0);
        }
    }
    // The map's ellipse has area 4 pi (equal-area projection); the cells are 0.01 x 0.01. Tolerance:
    // the cells along the rim (~900 of ~125,000) count whole or not at all (common practice, no source).
    CHECK(static_cast<double>(on_map) * 1e-4 == doctest::Approx(4.0 * std::numbers::pi).epsilon(0.005));
}
