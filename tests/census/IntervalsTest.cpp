#include "census/Intervals.h"

#include <doctest/doctest.h>

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
