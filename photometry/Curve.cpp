#include "photometry/Curve.h"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <limits>

namespace starcensus::photometry::detail {

double Curve::at(double at_x) const {
    constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    if (x.empty() || !(at_x >= x.front() && at_x <= x.back())) {
        return kNaN;
    }
    if (at_x == x.back()) {
        return y.back();
    }
    // The first x above at_x (std::upper_bound) by a branch-free halving search: the classifier calls
    // this several times per star and re-measurement, and the comparisons are unpredictable.
    const double* base = x.data();
    std::size_t length = x.size();
    while (length > 1) {
        const std::size_t half = length / 2;
        base = base[half - 1] <= at_x ? base + half : base;
        length -= half;
    }
    const auto i = static_cast<std::size_t>(base - x.data()) + (*base <= at_x ? 1 : 0);
    const double fraction = (at_x - x[i - 1]) / (x[i] - x[i - 1]);
    return y[i - 1] + fraction * (y[i] - y[i - 1]);
}

Curve runningMaximumCurve(const std::vector<double>& x, const std::vector<double>& y) {
    Curve curve;
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (std::isnan(x[i]) || std::isnan(y[i])) {
            continue;
        }
        if (curve.x.empty() || x[i] > curve.x.back()) {
            curve.x.push_back(x[i]);
            curve.y.push_back(y[i]);
        }
    }
    return curve;
}

} // namespace starcensus::photometry::detail
