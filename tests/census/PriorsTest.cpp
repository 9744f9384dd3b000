#include "census/Priors.h"

#include "census/Random.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <random>

using namespace starcensus;
using photometry::StellarClass;

namespace {

constexpr std::array<double, 5> kLevels = {0.5, 0.5 - census::kProbability68 / 2,
                                           0.5 + census::kProbability68 / 2, 0.5 - census::kProbability95 / 2,
                                           0.5 + census::kProbability95 / 2};

std::array<double, 5> asArray(const census::IntervalSummary& s) {
    return {s.median, s.lo68, s.hi68, s.lo95, s.hi95};
}

std::array<double, 5> quantilesOf(std::vector<double> values) {
    std::array<double, 5> q{};
    for (std::size_t k = 0; k < kLevels.size(); ++k) {
        q[k] = census::sampleQuantile(values, kLevels[k]);
    }
    return q;
}

/// Largest |difference| between the quantiles of the fitted samples and the stored draws' quantiles.
double largestDifference(const std::array<double, 5>& fitted, const census::IntervalSummary& stored) {
    const auto draws = asArray(stored);
    double largest = 0.0;
    for (std::size_t k = 0; k < draws.size(); ++k) {
        largest = std::max(largest, std::abs(fitted[k] - draws[k]));
    }
    return largest;
}

// What a downstream tool does with priors.json: gamma deviates, normalised for the Dirichlet and the Beta.
double gammaSample(census::Xoshiro256& random, double shape, double rate) {
    return std::gamma_distribution<double>(shape, 1.0 / rate)(random);
}

std::vector<std::vector<double>> sampleDirichlet(const census::DirichletFit& fit, std::size_t n,
                                                 census::Xoshiro256& random) {
    std::vector<std::vector<double>> samples(fit.alpha.size(), std::vector<double>(n));
    std::vector<double> x(fit.alpha.size());
    for (std::size_t i = 0; i < n; ++i) {
        double sum = 0.0;
        for (std::size_t c = 0; c < x.size(); ++c) {
            x[c] = gammaSample(random, fit.alpha[c], 1.0);
            sum += x[c];
        }
        for (std::size_t c = 0; c < x.size(); ++c) {
            samples[c][i] = x[c] / sum;
        }
    }
    return samples;
}

std::vector<double> sampleBeta(const census::BetaFit& fit, std::size_t n, census::Xoshiro256& random) {
    std::vector<double> samples(n);
    for (double& value : samples) {
        const double a = gammaSample(random, fit.alpha, 1.0);
        value = a / (a + gammaSample(random, fit.beta, 1.0));
    }
    return samples;
}

std::vector<double> sampleGamma(const census::GammaFit& fit, std::size_t n, census::Xoshiro256& random) {
    std::vector<double> samples(n);
    for (double& value : samples) {
        value = gammaSample(random, fit.shape, fit.rate);
    }
    return samples;
}

// Tallies of a noise-free census: every draw sees the same counts per category.
census::DrawTallies fixedTallies(int draws,
                                 const std::vector<std::pair<photometry::Category, std::uint32_t>>& n) {
    census::DrawTallies tallies;
    tallies.draws = draws;
    tallies.radii = 1;
    tallies.counts.assign(static_cast<std::size_t>(draws) * photometry::kCategoryCount, 0);
    for (const auto& [category, count] : n) {
        std::fill_n(tallies.counts.begin() + static_cast<std::ptrdiff_t>(category) * draws, draws, count);
    }
    return tallies;
}

} // namespace

TEST_CASE("moment fits recover known Beta, gamma and Dirichlet parameters (injection-recovery)") {
    census::Xoshiro256 random(11);
    constexpr std::size_t kSamples = 200000;
    // Parameters to inject are arbitrary; the moment estimators' relative scatter at 2e5 samples is
    // below 1%, so 2% is a >2-sigma band (common practice, no source).
    const auto beta = census::fitBetaMoments(sampleBeta({3.5, 40.0}, kSamples, random));
    CHECK(beta.alpha == doctest::Approx(3.5).epsilon(0.02));
    CHECK(beta.beta == doctest::Approx(40.0).epsilon(0.02));
    const auto gamma = census::fitGammaMoments(sampleGamma({12.5, 300.0}, kSamples, random));
    CHECK(gamma.shape == doctest::Approx(12.5).epsilon(0.02));
    CHECK(gamma.rate == doctest::Approx(300.0).epsilon(0.02));
    const census::DirichletFit injected{{0.5, 2.0, 7.5, 30.0}, 40.0};
    const auto dirichlet = census::fitDirichletMoments(sampleDirichlet(injected, kSamples, random));
    CHECK(dirichlet.concentration == doctest::Approx(40.0).epsilon(0.02));
    for (std::size_t c = 0; c < injected.alpha.size(); ++c) {
        CHECK(dirichlet.alpha[c] == doctest::Approx(injected.alpha[c]).epsilon(0.02));
    }
    const auto aggregated = census::aggregateDirichlet(injected, {1, 2});
    CHECK(aggregated.alpha == doctest::Approx(9.5));
    CHECK(aggregated.beta == doctest::Approx(30.5));
}

TEST_CASE("noise-free census: the fits recover the Jeffreys-Dirichlet posterior of the counts") {
    // 30 G, 20 K and 50 M dwarfs in every draw: the class fractions are Dirichlet(n_c + 1/2) over the 13
    // classes, concentration N + 13/2 = 106.5; a class's expected count is Gamma(n_c + 1/2) (Fractions.h).
    const auto tallies = fixedTallies(400, {{42, 30}, {53, 20}, {64, 50}});
    auto groups = census::standardClassGroups();
    groups.push_back(census::parseClassGroup("GK=G,K"));
    const auto priors = census::estimatePriors(
        {10.0}, groups,
        census::populationDeviatesByRadius(tallies, groups, {.population_deviates_per_draw = 8}));
    REQUIRE(priors.size() == 1);
    const auto& radius = priors[0];
    CHECK(radius.population_deviates == 3200);
    // Moment estimates from 3200 deviates: relative scatter of a variance ~ sqrt(2 / 3200) = 2.5%.
    CHECK(radius.class_fractions.concentration == doctest::Approx(106.5).epsilon(0.06));
    const auto& m_dwarfs = radius.groups[static_cast<std::size_t>(StellarClass::M)];
    CHECK(m_dwarfs.fraction_beta.alpha / radius.class_fractions.concentration ==
          doctest::Approx(50.5 / 106.5).epsilon(0.01));
    CHECK(m_dwarfs.fraction.mean == doctest::Approx(50.5 / 106.5).epsilon(0.01));
    // Expected count Gamma(50.5) over the volume: shape 50.5, rate V (pc^3).
    CHECK(m_dwarfs.density_gamma.shape == doctest::Approx(50.5).epsilon(0.06));
    CHECK(m_dwarfs.density_gamma.rate == doctest::Approx(census::sphereVolumePc3(10.0)).epsilon(0.06));
    // G and K: prior shares 1/2 each, Beta(30 + 20 + 1, 106.5 - 51).
    const auto& gk = radius.groups.back();
    CHECK_FALSE(gk.standard_class);
    CHECK(gk.fraction_beta.alpha == doctest::Approx(51.0).epsilon(0.06));
    CHECK(gk.fraction_beta.beta == doctest::Approx(55.5).epsilon(0.06));
}

TEST_CASE(
    "priors round trip: sampling the fitted Dirichlet, Beta and gamma reproduces the draws' quantiles") {
    // A mock 12 pc neighbourhood through the Monte Carlo, as in a run. The tolerance is 0.01:
    //  - fractions: every stored quantile (median, 68% and 95% limits) within 0.01 in fraction;
    //  - densities: the fitted gamma puts each stored quantile within 0.01 of its probability level, and for
    //    groups with a median of at least 20 members within 1% of the median in density. (For a handful of
    //    members the stored tail quantiles themselves scatter by more than 1% of the median: a Gamma(1/2)
    //    tail quantile from 20000 deviates has a standard error of ~25% of the median.)
    // 500 draws x 40 deviates keep the stored quantiles' own noise (probability level sqrt(p(1-p)/n)
    // <= 0.0035) well inside the tolerance.
    census::mock::MockSettings mock_settings;
    mock_settings.radius_max_pc = 12.0;
    const auto mock = census::mock::simulateNeighbourhood(mock_settings, 20240611);
    const std::vector<double> radii = {5.0, 10.0};
    const census::PreparedSample sample(mock.catalog, radii, census::MembershipSettings{},
                                        census::RowClassRules{}, 2);
    const auto grid = photometry::ClassGrid::fromClassifier(photometry::Classifier::shipped());
    const auto tallies = census::drawSample(sample, grid, {.draws = 500, .seed = 7, .threads = 2});
    auto groups = census::standardClassGroups();
    groups.push_back(census::parseClassGroup("FGK=F,G,K"));
    groups.push_back(census::parseClassGroup("earlyM=M0-M4"));
    const auto priors = census::estimatePriors(
        radii, groups,
        census::populationDeviatesByRadius(tallies, groups, {.population_deviates_per_draw = 40, .seed = 7}));

    census::Xoshiro256 random(99);
    constexpr std::size_t kSamples = 200000;
    for (const auto& radius : priors) {
        const auto classes = sampleDirichlet(radius.class_fractions, kSamples, random);
        double worst_fraction = 0.0;
        double worst_level = 0.0;
        double worst_relative = 0.0;
        for (std::size_t g = 0; g < radius.groups.size(); ++g) {
            const auto& group = radius.groups[g];
            CAPTURE(radius.radius_pc);
            CAPTURE(group.name);
            const auto fitted = group.standard_class
                                    ? quantilesOf(classes[g])
                                    : quantilesOf(sampleBeta(group.fraction_beta, kSamples, random));
            const double fraction_difference = largestDifference(fitted, group.fraction.quantiles);
            CHECK(fraction_difference <= 0.01);
            worst_fraction = std::max(worst_fraction, fraction_difference);

            auto densities = sampleGamma(group.density_gamma, kSamples, random);
            std::sort(densities.begin(), densities.end());
            const auto stored = asArray(group.density_pc3.quantiles);
            for (std::size_t k = 0; k < kLevels.size(); ++k) {
                const auto below = std::lower_bound(densities.begin(), densities.end(), stored[k]);
                const double level = static_cast<double>(below - densities.begin()) / kSamples;
                CHECK(std::abs(level - kLevels[k]) <= 0.01);
                worst_level = std::max(worst_level, std::abs(level - kLevels[k]));
            }
            if (group.density_pc3.quantiles.median * radius.volume_pc3 >= 20.0) {
                const double relative =
                    largestDifference(quantilesOf(densities), group.density_pc3.quantiles) /
                    group.density_pc3.quantiles.median;
                CHECK(relative <= 0.01);
                worst_relative = std::max(worst_relative, relative);
            }
        }
        // A union of classes: the Dirichlet's aggregated Beta reproduces the group's quantiles too.
        const auto fgk = quantilesOf(
            sampleBeta(census::aggregateDirichlet(radius.class_fractions, {3, 4, 5}), kSamples, random));
        const double fgk_difference =
            largestDifference(fgk, radius.groups[photometry::kClassCount].fraction.quantiles);
        CHECK(fgk_difference <= 0.01);
        MESSAGE("R = " << radius.radius_pc << " pc: largest quantile difference in fraction "
                       << worst_fraction << " (FGK from the Dirichlet " << fgk_difference
                       << "); density: probability level " << worst_level
                       << ", relative to the median (>= 20 members) " << worst_relative);
    }
}
