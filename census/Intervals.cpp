#include "census/Intervals.h"

#include <boost/math/special_functions/gamma.hpp>

#include <algorithm>
#include <cmath>

namespace starcensus::census {

double sampleQuantile(std::span<double> values, double q) {
    if (values.empty()) {
        return std::nan("");
    }
    const double position = std::clamp(q, 0.0, 1.0) * static_cast<double>(values.size() - 1);
    const auto lower = static_cast<std::size_t>(std::floor(position));
    const auto upper = std::min(lower + 1, values.size() - 1);
    std::nth_element(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(lower), values.end());
    const double lower_value = values[lower];
    if (upper == lower) {
        return lower_value;
    }
    const double upper_value =
        *std::min_element(values.begin() + static_cast<std::ptrdiff_t>(lower) + 1, values.end());
    return lower_value + (position - static_cast<double>(lower)) * (upper_value - lower_value);
}

IntervalSummary summarizeDraws(std::span<double> draws) {
    std::sort(draws.begin(), draws.end());
    const auto quantile = [&](double q) { return sampleQuantile(draws, q); };
    return {quantile(0.5), quantile(0.5 - kProbability68 / 2), quantile(0.5 + kProbability68 / 2),
            quantile(0.5 - kProbability95 / 2), quantile(0.5 + kProbability95 / 2)};
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
