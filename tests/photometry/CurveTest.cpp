#include "photometry/Curve.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>

using starcensus::photometry::detail::Curve;

namespace {
/// Linear interpolation on the segment std::upper_bound finds: the textbook lookup the indexed one must
/// reproduce exactly.
double referenceAt(const Curve& curve, double at_x) {
    if (!(at_x >= curve.x.front() && at_x <= curve.x.back())) {
        return std::nan("");
    }
    const auto upper = std::upper_bound(curve.x.begin(), curve.x.end(), at_x);
    if (upper == curve.x.end()) {
        return curve.y.back();
    }
    const auto i = static_cast<std::size_t>(upper - curve.x.begin());
    const double fraction = (at_x - curve.x[i - 1]) / (curve.x[i] - curve.x[i - 1]);
    return curve.y[i - 1] + fraction * (curve.y[i] - curve.y[i - 1]);
}
} // namespace

TEST_CASE("indexed curve lookups equal binary-search interpolation, at nodes, next to them and outside") {
    // Uneven spacing (clusters of close points between wide gaps) exercises buckets holding many points
    // and empty ones; queries one ulp either side of each node exercise the bucket-edge rounding.
    std::mt19937_64 random(1);
    std::uniform_real_distribution<double> uniform(0.0, 1.0);
    for (std::size_t size = 1; size < 40; ++size) {
        Curve curve;
        double x = -3.0;
        for (std::size_t i = 0; i < size; ++i) {
            x += (i % 7 == 0 ? 5.0 * uniform(random) : 0.001 * uniform(random)) + 1e-9;
            curve.x.push_back(x);
            curve.y.push_back(uniform(random));
        }
        Curve indexed = curve;
        indexed.buildIndex();
        for (std::size_t k = 0; k < 3000; ++k) {
            const double node = curve.x[k % size];
            const double at_x = k % 4 == 0   ? node
                                : k % 4 == 1 ? std::nextafter(node, 1e9)
                                : k % 4 == 2
                                    ? std::nextafter(node, -1e9)
                                    : curve.x.front() - 0.1 + (x - curve.x.front() + 0.2) * uniform(random);
            const double expected = referenceAt(curve, at_x);
            CAPTURE(size);
            CAPTURE(at_x);
            if (std::isnan(expected)) {
                CHECK(std::isnan(indexed.at(at_x)));
                CHECK(std::isnan(curve.at(at_x)));
            } else {
                CHECK(indexed.at(at_x) == expected);
                CHECK(curve.at(at_x) == expected);
            }
        }
    }
}
