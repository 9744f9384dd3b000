#include "census/detail/VectorMath.h"

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

using starcensus::census::detail::expInPlace;
using starcensus::census::detail::log10InPlace;

namespace {

// |a - b| in units of b's last place.
double ulpsApart(double a, double b) {
    return std::abs(a - b) / (std::nextafter(std::abs(b), INFINITY) - std::abs(b));
}

} // namespace

TEST_CASE("the vector exp and log10 agree with the scalar libm calls within 4 ulp") {
    // Reference: glibc's scalar exp and log10, within about 1 ulp of the exact value (glibc manual, "Errors
    // in Math Functions", from memory); 4 ulp is libmvec's documented bound (from memory). Ranges: a
    // posterior grid's exp arguments (-50 to 0: the Gaussian out to 10 sigma less the prior's log) and the
    // log10 arguments of the quantile tables (100 / parallax, parallaxes of 0.1 mas to 10 arcsec), plus odd
    // lengths that leave a tail beside the 4-wide steps.
    for (const std::size_t length : {1u, 3u, 65u, 401u, 1001u}) {
        std::vector<double> exponents(length);
        std::vector<double> arguments(length);
        for (std::size_t i = 0; i < length; ++i) {
            const double f = length > 1 ? static_cast<double>(i) / static_cast<double>(length - 1) : 0.5;
            exponents[i] = -50.0 * f + 1e-3 * std::sin(7.0 * static_cast<double>(i));
            arguments[i] = std::pow(10.0, -2.0 + 5.0 * f);
        }
        std::vector<double> exps = exponents;
        std::vector<double> logs = arguments;
        expInPlace(exps);
        log10InPlace(logs);
        double worst_exp = 0.0;
        double worst_log = 0.0;
        for (std::size_t i = 0; i < length; ++i) {
            worst_exp = std::max(worst_exp, ulpsApart(exps[i], std::exp(exponents[i])));
            worst_log = std::max(worst_log, ulpsApart(logs[i], std::log10(arguments[i])));
        }
        CAPTURE(length);
        CHECK(worst_exp <= 4.0);
        CHECK(worst_log <= 4.0);
    }
    std::vector<double> zero = {0.0, 1.0};
    expInPlace(zero);
    CHECK(zero[0] == 1.0);
    CHECK(zero[1] == doctest::Approx(std::exp(1.0)).epsilon(1e-15));
}
