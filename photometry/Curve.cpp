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
    // i: the first x above at_x (what std::upper_bound gives), found from the bucket's guess by stepping
    // either way; without an index, by binary search.
    std::size_t i = 0;
    if (!bucket_first_.empty()) {
        const auto bucket =
            std::min(static_cast<std::size_t>((at_x - x.front()) * bucket_scale_), bucket_first_.size() - 1);
        i = bucket_first_[bucket];
        while (i > 0 && x[i - 1] > at_x) {
            --i;
        }
        while (x[i] <= at_x) {
            ++i;
        }
    } else {
        i = static_cast<std::size_t>(std::upper_bound(x.begin(), x.end(), at_x) - x.begin());
    }
    const double fraction = (at_x - x[i - 1]) / (x[i] - x[i - 1]);
    return y[i - 1] + fraction * (y[i] - y[i - 1]);
}

void Curve::buildIndex() {
    bucket_first_.clear();
    if (x.size() < 2) {
        return;
    }
    // Four buckets per segment on average: one or two steps for near-uniform spacing.
    const std::size_t buckets = 4 * (x.size() - 1);
    bucket_scale_ = static_cast<double>(buckets) / (x.back() - x.front());
    bucket_first_.resize(buckets);
    std::size_t i = 1;
    for (std::size_t b = 0; b < buckets; ++b) {
        const double start = x.front() + static_cast<double>(b) / bucket_scale_;
        while (i + 1 < x.size() && x[i] <= start) {
            ++i;
        }
        bucket_first_[b] = static_cast<std::uint32_t>(i);
    }
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
    curve.buildIndex();
    return curve;
}

} // namespace starcensus::photometry::detail
