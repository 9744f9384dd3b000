#include "census/InitialMassFunction.h"

#include "photometry/base/InputError.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>

#include <cmath>
#include <sstream>
#include <string>

using namespace starcensus::census;
using starcensus::testing::runReferencePython;

namespace {

// scipy.integrate.quad of the IMF as written in tests/python/imf_fraction.py from the papers.
double scipyFraction(const ImfSettings& s, double low, double high) {
    std::ostringstream arguments;
    arguments.precision(17);
    if (s.family == ImfFamily::Kroupa2001) {
        arguments << "kroupa " << s.mass_min_msun << ' ' << s.mass_max_msun << ' ' << s.kroupa_alpha_low
                  << ' ' << s.kroupa_alpha_mid << ' ' << s.kroupa_alpha_high << ' ' << s.kroupa_break_low_msun
                  << ' ' << s.kroupa_break_high_msun;
    } else {
        arguments << "chabrier " << s.mass_min_msun << ' ' << s.mass_max_msun << ' '
                  << s.chabrier_peak_mass_msun << ' ' << s.chabrier_sigma_dex << ' ' << s.chabrier_join_msun
                  << ' ' << s.chabrier_x_high;
    }
    arguments << ' ' << low << ' ' << high;
    return std::stod(runReferencePython("imf_fraction.py", arguments.str()));
}

// Draws `n` masses and checks the fraction in each [edge_i, edge_i+1) against the exact integral, with
// a binomial tolerance of 4 sigma.
void checkSampledFractions(const InitialMassFunction& imf, const std::vector<double>& edges,
                           std::uint64_t seed) {
    constexpr int n = 200000;
    Xoshiro256 random(seed, 5);
    std::vector<int> counts(edges.size() - 1, 0);
    int outside_range = 0;
    for (int i = 0; i < n; ++i) {
        const double m = imf.sample(random);
        outside_range += (m < imf.settings().mass_min_msun || m > imf.settings().mass_max_msun) ? 1 : 0;
        for (std::size_t b = 0; b + 1 < edges.size(); ++b) {
            if (m >= edges[b] && m < edges[b + 1]) {
                ++counts[b];
            }
        }
    }
    CHECK(outside_range == 0);
    for (std::size_t b = 0; b + 1 < edges.size(); ++b) {
        const double p = imf.fractionBetween(edges[b], edges[b + 1]);
        const double sigma = std::sqrt(p * (1.0 - p) / n);
        CAPTURE(edges[b]);
        CHECK(std::abs(counts[b] / static_cast<double>(n) - p) < 4.0 * sigma + 1e-12);
    }
}

} // namespace

TEST_CASE("Kroupa 2001 IMF: analytic number fractions") {
    const InitialMassFunction imf(ImfSettings{});
    // Kroupa 2001 eq. 2 integrated by hand: xi = m^-0.3 (m < 0.08), 0.08 m^-1.3 (0.08-0.5),
    // 0.04 m^-2.3 (> 0.5), continuous at the breaks; range 0.01-100 Msun.
    const double below_008 = (std::pow(0.08, 0.7) - std::pow(0.01, 0.7)) / 0.7;
    const double mid = 0.08 * (std::pow(0.5, -0.3) - std::pow(0.08, -0.3)) / -0.3;
    const double high = 0.04 * (std::pow(100.0, -1.3) - std::pow(0.5, -1.3)) / -1.3;
    const double total = below_008 + mid + high;
    CHECK(imf.fractionBetween(0.01, 0.5) == doctest::Approx((below_008 + mid) / total).epsilon(1e-12));
    CHECK(imf.fractionBetween(0.01, 0.08) == doctest::Approx(below_008 / total).epsilon(1e-12));
    CHECK(imf.fractionBetween(0.0, 1000.0) == doctest::Approx(1.0).epsilon(1e-14));
    // ... and the same figures by scipy quadrature (independent reference).
    CHECK(imf.fractionBetween(0.01, 0.5) ==
          doctest::Approx(scipyFraction(ImfSettings{}, 0.01, 0.5)).epsilon(1e-9));
    CHECK(imf.fractionBetween(1.0, 8.0) ==
          doctest::Approx(scipyFraction(ImfSettings{}, 1.0, 8.0)).epsilon(1e-9));
    // Continuity at the breaks (eq. 2 is continuous by construction).
    CHECK(imf.density(0.08 * (1 - 1e-9)) == doctest::Approx(imf.density(0.08 * (1 + 1e-9))).epsilon(1e-6));
    CHECK(imf.density(0.5 * (1 - 1e-9)) == doctest::Approx(imf.density(0.5 * (1 + 1e-9))).epsilon(1e-6));
    CHECK(imf.density(0.005) == 0.0);
}

TEST_CASE("Chabrier 2003 IMF: integrals agree with scipy quadrature, continuous at the join") {
    ImfSettings settings;
    settings.family = ImfFamily::Chabrier2003;
    const InitialMassFunction imf(settings);
    for (const auto& [low, high] :
         std::vector<std::pair<double, double>>{{0.01, 0.08}, {0.08, 1.0}, {0.3, 3.0}, {1.0, 100.0}}) {
        CAPTURE(low);
        CHECK(imf.fractionBetween(low, high) ==
              doctest::Approx(scipyFraction(settings, low, high)).epsilon(1e-9));
    }
    CHECK(imf.density(1.0 - 1e-9) == doctest::Approx(imf.density(1.0 + 1e-9)).epsilon(1e-6));
    // Integral of the density by the trapezoid rule in log mass equals 1.
    double sum = 0.0;
    const int steps = 20000;
    const double a = std::log(0.01), b = std::log(100.0), h = (b - a) / steps;
    for (int i = 0; i <= steps; ++i) {
        const double m = std::exp(a + i * h);
        sum += (i == 0 || i == steps ? 0.5 : 1.0) * imf.density(m) * m * h;
    }
    CHECK(sum == doctest::Approx(1.0).epsilon(1e-4));
}

TEST_CASE("IMF draws reproduce the analytic mass fractions (binomial 4 sigma)") {
    const std::vector<double> edges = {0.01, 0.03, 0.08, 0.2, 0.5, 1.0, 3.0, 10.0, 100.0};
    checkSampledFractions(InitialMassFunction(ImfSettings{}), edges, 11);
    ImfSettings chabrier;
    chabrier.family = ImfFamily::Chabrier2003;
    checkSampledFractions(InitialMassFunction(chabrier), edges, 12);
    ImfSettings salpeter_like; // one slope everywhere, incl. the logarithmic case alpha = 1
    salpeter_like.kroupa_alpha_low = 1.0;
    salpeter_like.mass_min_msun = 0.05;
    salpeter_like.mass_max_msun = 20.0;
    checkSampledFractions(InitialMassFunction(salpeter_like), {0.05, 0.07, 0.1, 0.5, 2.0, 20.0}, 13);
}

TEST_CASE("IMF settings out of range are rejected naming the option") {
    ImfSettings bad;
    bad.mass_min_msun = 0.0;
    CHECK_THROWS_WITH_AS(InitialMassFunction{bad},
                         "--imf-mass-min: 0 is outside the allowed range (0, 1] Msun",
                         starcensus::InputError);
    bad = {};
    bad.kroupa_break_low_msun = 0.6;
    CHECK_THROWS_AS(InitialMassFunction{bad}, starcensus::InputError);
    bad = {};
    bad.chabrier_sigma_dex = std::nan("");
    CHECK_THROWS_AS(InitialMassFunction{bad}, starcensus::InputError);
}
