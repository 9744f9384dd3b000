#include "census/Intervals.h"

#include <boost/math/special_functions/gamma.hpp>

#include <algorithm>
#include <cmath>

namespace starcensus::census {

namespace {
/// Quantile q of values[first, end) where every element before `first` is no larger than any after it
/// (so the order statistics from `first` on are those of the whole); `first` moves past the lower
/// order statistic found, ready for a larger q. Hyndman & Fan 1996, definition 7.
double quantileFrom(std::span<double> values, std::size_t& first, double q) {
    const double position = std::clamp(q, 0.0, 1.0) * static_cast<double>(values.size() - 1);
    const auto lower = std::max(first, static_cast<std::size_t>(std::floor(position)));
    const auto upper = std::min(lower + 1, values.size() - 1);
    std::nth_element(values.begin() + static_cast<std::ptrdiff_t>(first),
                     values.begin() + static_cast<std::ptrdiff_t>(lower), values.end());
    first = lower;
    const double lower_value = values[lower];
    if (upper == lower) {
        return lower_value;
    }
    const double upper_value =
        *std::min_element(values.begin() + static_cast<std::ptrdiff_t>(lower) + 1, values.end());
    return lower_value + (position - static_cast<double>(lower)) * (upper_value - lower_value);
}
} // namespace

double sampleQuantile(std::span<double> values, double q) {
    if (values.empty()) {
        return std::nan("");
    }
    std::size_t first = 0;
    return quantileFrom(values, first, q);
}

IntervalSummary summarizeDraws(std::span<double> draws) {
    if (draws.empty()) {
        const double nan = std::nan("");
        return {nan, nan, nan, nan, nan};
    }
    // Five selections on shrinking ranges, in increasing q: a few passes over the draws, not a sort.
    std::size_t first = 0;
    IntervalSummary summary;
    summary.lo95 = quantileFrom(draws, first, 0.5 - kProbability95 / 2);
    summary.lo68 = quantileFrom(draws, first, 0.5 - kProbability68 / 2);
    summary.median = quantileFrom(draws, first, 0.5);
    summary.hi68 = quantileFrom(draws, first, 0.5 + kProbability68 / 2);
    summary.hi95 = quantileFrom(draws, first, 0.5 + kProbability95 / 2);
    return summary;
}

IntervalSummary scaled(const IntervalSummary& summary, double factor) {
    return {summary.median * factor, summary.lo68 * factor, summary.hi68 * factor, summary.lo95 * factor,
            summary.hi95 * factor};
}

std::array<double, 2> centralInterval(std::span<double> values, double probability) {
    if (values.empty()) {
        return {std::nan(""), std::nan("")};
    }
    std::size_t first = 0;
    const double low = quantileFrom(values, first, 0.5 - probability / 2);
    return {low, quantileFrom(values, first, 0.5 + probability / 2)};
}

IntervalSummary poissonInterval(double count) {
    const auto lower_limit = [count](double probability) {
        const double tail = (1.0 - probability) / 2.0;
        return count <= 0.0 ? 0.0 : boost::math::gamma_p_inv(count, tail);
    };
    const auto upper_limit = [count](double probability) {
        const double tail = (1.0 - probability) / 2.0;
        return boost::math::gamma_p_inv(count + 1.0, 1.0 - tail);
    };
    return {boost::math::gamma_p_inv(count + 0.5, 0.5), lower_limit(kProbability68),
            upper_limit(kProbability68), lower_limit(kProbability95), upper_limit(kProbability95)};
}

} // namespace starcensus::census
