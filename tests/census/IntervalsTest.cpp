#include "census/Intervals.h"
#include "census/Random.h"

#include <boost/math/special_functions/gamma.hpp>
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <numeric>
#include <vector>

using namespace starcensus::census;

TEST_CASE("Poisson confidence limits match Gehrels (1986) Table 1 and 2") {
    // Gehrels 1986, ApJ 303, 336: for n = 0 the 1-sided 84.13% upper limit is 1.841 and for n = 10 the
    // 84.13% limits are 6.891 (lower, Table 2) and 14.27 (upper, Table 1) (from memory of the tables;
    // scipy.stats.chi2.ppf(p, 2n)/2 gives 1.8407, 6.8918 and 14.266). Tolerance 1e-3: the tables' rounding.
    const IntervalSummary zero = poissonInterval(0.0);
    CHECK(zero.lo68 == 0.0);
    CHECK(zero.hi68 == doctest::Approx(1.841).epsilon(1e-3));
    const IntervalSummary ten = poissonInterval(10.0);
    CHECK(ten.lo68 == doctest::Approx(6.891).epsilon(1e-3));
    CHECK(ten.hi68 == doctest::Approx(14.27).epsilon(1e-3));
    CHECK(ten.median == doctest::Approx(10.17).epsilon(2e-3)); // gamma(10.5) median (scipy: 10.1668)
}

TEST_CASE("sample quantiles use linear interpolation between order statistics") {
    // NumPy's default (Hyndman & Fan type 7): numpy.quantile(range(1, 11), 0.25) = 3.25.
    std::vector<double> values(10);
    std::iota(values.begin(), values.end(), 1.0);
    CHECK(sampleQuantile(values, 0.25) == doctest::Approx(3.25));
    CHECK(sampleQuantile(values, 0.5) == doctest::Approx(5.5));
    const IntervalSummary summary = summarizeDraws(values);
    CHECK(summary.median == doctest::Approx(5.5));
    CHECK(summary.lo95 == doctest::Approx(1.0 + 9.0 * (0.5 - kProbability95 / 2)));
}

TEST_CASE("interval summaries by selection equal the sorted-sample quantiles") {
    // Hyndman & Fan 1996, definition 7, evaluated on a sorted copy (the textbook way) against the
    // selection-based summary on shuffled draws with ties; exact equality is expected.
    const auto sorted_quantile = [](std::vector<double> values, double q) {
        std::sort(values.begin(), values.end());
        const double position = q * static_cast<double>(values.size() - 1);
        const auto lower = static_cast<std::size_t>(std::floor(position));
        const std::size_t upper = std::min(lower + 1, values.size() - 1);
        return values[lower] + (position - static_cast<double>(lower)) * (values[upper] - values[lower]);
    };
    starcensus::census::Xoshiro256 random(3);
    for (const std::size_t size : {1U, 2U, 7U, 4000U}) {
        std::vector<double> draws(size);
        for (double& value : draws) {
            value = std::floor(20.0 * random.uniform()); // many ties
        }
        std::vector<double> work = draws;
        const IntervalSummary summary = summarizeDraws(work);
        CHECK(summary.lo95 == sorted_quantile(draws, 0.5 - kProbability95 / 2));
        CHECK(summary.lo68 == sorted_quantile(draws, 0.5 - kProbability68 / 2));
        CHECK(summary.median == sorted_quantile(draws, 0.5));
        CHECK(summary.hi68 == sorted_quantile(draws, 0.5 + kProbability68 / 2));
        CHECK(summary.hi95 == sorted_quantile(draws, 0.5 + kProbability95 / 2));
    }
}

TEST_CASE("gamma deviates follow the gamma distribution (KS test against Boost's regularised gamma)") {
    // Kolmogorov-Smirnov one-sample test of 20000 deviates against P(shape, x) from Boost.Math, at shapes
    // on both sides of 1 (the boost branch) and large. The 1% critical value of sqrt(n) D is 1.628
    // (Kolmogorov distribution, from memory); seeds fixed, so the test is deterministic.
    constexpr std::size_t kDeviates = 20000;
    for (const double shape : {0.02, 0.5, 1.0, 3.7, 250.0}) {
        starcensus::census::Xoshiro256 random(11, static_cast<std::uint64_t>(shape * 100));
        std::vector<double> deviates(kDeviates);
        for (double& value : deviates) {
            value = random.gamma(shape);
        }
        std::sort(deviates.begin(), deviates.end());
        double largest_gap = 0.0;
        for (std::size_t i = 0; i < kDeviates; ++i) {
            const double cdf = boost::math::gamma_p(shape, std::max(deviates[i], 1e-300));
            largest_gap = std::max({largest_gap, cdf - static_cast<double>(i) / kDeviates,
                                    static_cast<double>(i + 1) / kDeviates - cdf});
        }
        INFO("shape " << shape);
        CHECK(std::sqrt(static_cast<double>(kDeviates)) * largest_gap < 1.628);
    }
    starcensus::census::Xoshiro256 random(1);
    CHECK(random.gamma(0.0) == 0.0);
}
