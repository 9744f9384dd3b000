#include "census/Membership.h"

#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <sstream>

using namespace starcensus::census;

TEST_CASE("membership probabilities agree with direct integration by scipy") {
    // Reference: scipy.integrate.quad of the same posterior (tests/python/membership_reference.py),
    // Bailer-Jones 2015, PASP 127, 994. Tolerance 2e-4 absolute: the trapezoid grid is ~0.05 sigma.
    std::istringstream lines(starcensus::testing::runReferencePython("membership_reference.py", ""));
    std::string prior;
    double parallax = 0, error = 0, radius = 0, outer = 0, expected = 0;
    constexpr double kTolerance = 2e-4;
    int compared = 0;
    double worst = 0.0;
    while (lines >> prior >> parallax >> error >> radius >> outer >> expected) {
        MembershipSettings settings;
        settings.outer_distance_pc = outer;
        settings.prior = prior == "constant" ? DistancePrior::ConstantDensity : DistancePrior::FlatParallax;
        const double computed = membershipProbability(parallax, error, radius, settings);
        worst = std::max(worst, std::abs(computed - expected));
        CHECK_MESSAGE(std::abs(computed - expected) < kTolerance,
                      prior << " plx=" << parallax << " err=" << error << " R=" << radius);
        ++compared;
    }
    CHECK(compared == 144);
    MESSAGE("largest difference from scipy: " << worst);
}

TEST_CASE("the small-error limit of the membership probability is the hard parallax cut") {
    const MembershipSettings settings;
    for (const double parallax : {99.0, 99.9, 100.1, 101.0}) {
        const double probability = membershipProbability(parallax, 1e-4, 10.0, settings);
        CHECK(probability == doctest::Approx(insideByHardCut(parallax, 10.0, settings) ? 1.0 : 0.0));
    }
}

TEST_CASE("zero point and error inflation act on the parallax before the likelihood") {
    MembershipSettings shifted;
    shifted.parallax_zero_point_mas = -0.5; // parallax too small by 0.5 mas
    MembershipSettings plain;
    CHECK(membershipProbability(99.6, 0.2, 10.0, shifted) ==
          doctest::Approx(membershipProbability(100.1, 0.2, 10.0, plain)).epsilon(1e-9));
    MembershipSettings inflated;
    inflated.parallax_error_inflation = 2.0;
    CHECK(membershipProbability(101.0, 0.5, 10.0, inflated) ==
          doctest::Approx(membershipProbability(101.0, 1.0, 10.0, plain)).epsilon(1e-9));
}

TEST_CASE("distance-modulus quantiles follow the posterior") {
    // For a 1% parallax error the posterior is nearly Gaussian in parallax: the median distance modulus is
    // that of the measured parallax to within the Lutz-Kelker shift (~4 (sigma/plx)^2 relative in plx).
    const MembershipSettings settings;
    const DistancePosterior posterior(100.0, 1.0, settings);
    CHECK(posterior.medianDistancePc() == doctest::Approx(10.0).epsilon(2e-3));
    // P(d < d(u)) = u by construction: check at the quartiles.
    for (const double u : {0.25, 0.5, 0.75}) {
        const double distance_pc = 10.0 * std::pow(10.0, posterior.distanceModulusAt(u) / 5.0);
        CHECK(std::abs(posterior.probabilityWithin(distance_pc) - u) < 2e-3); // quantile-table interpolation
    }
}

TEST_CASE("the Gaussian shortcut for precise parallaxes agrees with the tabulated posterior") {
    // Same posterior two ways: Laplace approximation (default for sigma/plx <= 0.02) and the 0.05-sigma
    // grid (shortcut disabled). Tolerance 1.2e-4 in probability: the grid's own error, linear
    // interpolation of its CDF, is h^2/8 max|pdf'| = 0.05^2 / 8 * 0.242 = 7.6e-5 at 0.05 sigma spacing and
    // up to ~1.1e-4 where the log-spaced nodes are wider (the flat-prior shortcut is the exact Gaussian,
    // so this is the grid's error, not the shortcut's); 2e-4 mag in the quantiles.
    MembershipSettings grid;
    grid.gaussian_shortcut_max_relative_error = 0.0;
    for (const auto prior : {DistancePrior::ConstantDensity, DistancePrior::FlatParallax}) {
        MembershipSettings shortcut;
        shortcut.prior = grid.prior = prior;
        for (const double parallax : {40.0, 100.0, 250.0}) {
            for (const double relative : {0.001, 0.005, 0.01, 0.02}) {
                const double error = relative * parallax;
                const DistancePosterior fast(parallax, error, shortcut);
                const DistancePosterior slow(parallax, error, grid);
                CAPTURE(parallax);
                CAPTURE(relative);
                for (const double z : {-3.0, -1.5, -0.5, 0.0, 0.5, 1.5, 3.0}) {
                    const double radius_pc = 1000.0 / (parallax + z * error);
                    CHECK(std::abs(fast.probabilityWithin(radius_pc) - slow.probabilityWithin(radius_pc)) <
                          1.2e-4);
                }
                for (std::size_t j = 1; j + 1 < DistancePosterior::kQuantileNodes; ++j) {
                    CHECK(std::abs(fast.distanceModulusQuantiles()[j] - slow.distanceModulusQuantiles()[j]) <
                          2e-4);
                }
            }
        }
    }
}

TEST_CASE("a deferred quantile table is the tabulated one once filled, and its ends are known before") {
    // Exact equality: both are the same arithmetic, done at construction or later. The ends are the
    // table's extremes on both paths (the Gaussian shortcut at 1% error, the grid at 10%).
    const MembershipSettings settings;
    for (const double relative : {0.01, 0.1}) {
        CAPTURE(relative);
        const DistancePosterior tabulated(50.0, relative * 50.0, settings);
        DistancePosterior deferred(50.0, relative * 50.0, settings, DistancePosterior::Quantiles::Deferred);
        const auto& table = tabulated.distanceModulusQuantiles();
        const auto [nearest, farthest] = std::minmax_element(table.begin(), table.end());
        CHECK(deferred.nearestModulus() == *nearest);
        CHECK(deferred.farthestModulus() == *farthest);
        CHECK(deferred.probabilityWithin(20.0) == tabulated.probabilityWithin(20.0));
        deferred.tabulateQuantiles();
        CHECK(deferred.distanceModulusQuantiles() == table);
        CHECK(deferred.nearestModulus() == table.front());
        CHECK(deferred.farthestModulus() == table.back());
    }
}

TEST_CASE("a Gaussian-shortcut posterior's compact form refills its quantile table exactly") {
    // What PreparedSample keeps for such a star instead of the table; the grid path has no compact form.
    const MembershipSettings settings;
    for (const double parallax_mas : {10.5, 48.0, 250.0}) { // well inside the prior's 200 pc
        for (const double relative : {0.001, 0.0105, 0.019}) {
            CAPTURE(parallax_mas);
            CAPTURE(relative);
            const DistancePosterior posterior(parallax_mas, relative * parallax_mas, settings);
            const auto form = posterior.gaussianForm();
            REQUIRE(form.has_value());
            std::array<float, DistancePosterior::kQuantileNodes> refilled{};
            form->fillQuantiles(refilled);
            CHECK(refilled == posterior.distanceModulusQuantiles());
        }
    }
    CHECK_FALSE(DistancePosterior(50.0, 5.0, settings).gaussianForm().has_value());
}
