#include "census/Fractions.h"

#include "census/CensusOptions.h"
#include "census/Random.h"
#include "photometry/base/InputError.h"

#include <doctest/doctest.h>

#include <cmath>
#include <random>

using namespace starcensus;
using photometry::StellarClass;

namespace {

// Tallies of a noise-free census: every draw sees the same n_g members in each of two categories.
census::DrawTallies fixedTallies(int draws, std::uint32_t n_first, std::uint32_t n_second) {
    census::DrawTallies tallies;
    tallies.draws = draws;
    tallies.radii = 1;
    tallies.counts.assign(static_cast<std::size_t>(draws) * photometry::kCategoryCount, 0);
    const auto first = photometry::categoryOf(StellarClass::G, 42.0);
    const auto second = photometry::categoryOf(StellarClass::M, 64.0);
    for (int d = 0; d < draws; ++d) {
        tallies.counts[first * static_cast<std::size_t>(draws) + static_cast<std::size_t>(d)] = n_first;
        tallies.counts[second * static_cast<std::size_t>(draws) + static_cast<std::size_t>(d)] = n_second;
    }
    return tallies;
}

} // namespace

TEST_CASE("class groups parse classes and subtype ranges") {
    const auto fgk = census::parseClassGroup("FGK=F,G,K");
    CHECK(fgk.name == "FGK");
    CHECK(fgk.categories.count() == 30);
    CHECK(fgk.categories.test(photometry::categoryOf(StellarClass::G, 42.0)));
    const auto early_m = census::parseClassGroup("earlyM = M0-M4");
    CHECK(early_m.categories.count() == 5);
    CHECK(early_m.categories.test(64));
    CHECK_FALSE(early_m.categories.test(65));
    CHECK(census::standardClassGroups().size() == photometry::kClassCount);
    // Pecaut & Mamajek locus Teff (data/ table): F9.5V 5990 K, G9V 5380 K, K0V 5290 K, K1V 5170 K. At
    // mid-subtype F9 (5990 K) to G9 (5335 K) lie inside 5300-6000 K, K0 (5230 K) does not.
    const auto sunlike = census::parseClassGroup("sunlike=teff:5300-6000");
    CHECK(sunlike.categories.test(39));
    CHECK(sunlike.categories.test(42));
    CHECK(sunlike.categories.test(49));
    CHECK_FALSE(sunlike.categories.test(50));
    CHECK_FALSE(sunlike.categories.test(60));
    const auto low_mass = census::parseClassGroup("lowmass=mass:0.08-0.3");
    CHECK(low_mass.categories.test(64));       // M4V 0.24 Msun in the locus
    CHECK_FALSE(low_mass.categories.test(60)); // M0V 0.585 Msun
    CHECK_THROWS_WITH_AS(census::parseClassGroup("x=teff:hot"), doctest::Contains("needs a range LOW-HIGH"),
                         InputError);
    CHECK_THROWS_WITH_AS(census::parseClassGroup("bad=Q7"),
                         doctest::Contains("class group 'bad=Q7': 'Q7' is neither a class"), InputError);
    CHECK_THROWS_AS(census::parseClassGroup("noequals"), InputError);
}

TEST_CASE("noise-free census: this-volume intervals collapse, population intervals are Jeffreys-Dirichlet "
          "intervals") {
    const auto tallies = fixedTallies(200, 30, 70);
    const auto groups = census::standardClassGroups();
    const auto estimates = census::estimateFractions(tallies, {10.0}, {100}, {100.0}, groups,
                                                     census::populationDeviatesByRadius(tallies, groups, {}));
    REQUIRE(estimates.size() == 1);
    const auto& g = estimates[0].groups[static_cast<std::size_t>(StellarClass::G)];
    CHECK(g.fraction.this_volume.median == doctest::Approx(0.3));
    CHECK(g.fraction.this_volume.lo95 == doctest::Approx(0.3));
    // G's share of the Dirichlet(n_c + 1/2) over the 13 classes is Beta(30.5, 70 + 12/2): median 0.2850,
    // 68% interval [0.2426, 0.3301] (scipy.stats.beta(30.5, 76.0).ppf); tolerance for 800 deviates.
    CHECK(g.fraction.population.median == doctest::Approx(0.2850).epsilon(0.03));
    CHECK(g.fraction.population.lo68 == doctest::Approx(0.2426).epsilon(0.04));
    CHECK(g.fraction.population.hi68 == doctest::Approx(0.3301).epsilon(0.04));
    CHECK(g.density_pc3.this_volume.median == doctest::Approx(30.0 / census::sphereVolumePc3(10.0)));
    CHECK(estimates[0].members.median == doctest::Approx(100.0));
}

TEST_CASE("population 68% intervals cover the true fraction at the quoted rate (injection-recovery)") {
    // Binomial samples from a known fraction, recovered with the population interval; over 400 trials
    // the coverage of a 68.3% interval has a binomial scatter of 2.3%, so 60-76% is a 3.4-sigma band.
    census::Xoshiro256 random(2024);
    const double true_fraction = 0.12;
    int covered = 0;
    constexpr int kTrials = 400;
    const auto groups = census::standardClassGroups();
    for (int trial = 0; trial < kTrials; ++trial) {
        std::binomial_distribution<std::uint32_t> binomial(150, true_fraction);
        const std::uint32_t n = binomial(random);
        const auto tallies = fixedTallies(50, n, 150 - n);
        const auto estimates = census::estimateFractions(
            tallies, {10.0}, {150}, {150.0}, groups,
            census::populationDeviatesByRadius(
                tallies, groups,
                {.population_deviates_per_draw = 8, .seed = static_cast<std::uint64_t>(trial)}));
        const auto& interval =
            estimates[0].groups[static_cast<std::size_t>(StellarClass::G)].fraction.population;
        covered += interval.lo68 <= true_fraction && true_fraction <= interval.hi68 ? 1 : 0;
    }
    const double coverage = static_cast<double>(covered) / kTrials;
    MESSAGE("population 68% interval coverage over " << kTrials << " trials: " << coverage);
    CHECK(coverage >= 0.60);
    CHECK(coverage <= 0.76);
}

TEST_CASE("user groups must not repeat a class's or another group's name") {
    census::CensusSettings settings;
    settings.group_definitions = {"FGK=F,G,K", "M=M0-M4"};
    CHECK_THROWS_WITH_AS(census::validate(settings),
                         "--group: 'M' repeats the name of a class or an earlier group", InputError);
    settings.group_definitions = {"FGK=F,G,K", "FGK=F,G"};
    CHECK_THROWS_AS(census::validate(settings), InputError);
    settings.group_definitions = {"FGK=F,G,K", "earlyM=M0-M4"};
    CHECK_NOTHROW(census::validate(settings));
}

TEST_CASE("unclassified members are counted by reason, and shares among the classified leave them out") {
    // 30 G and 10 M dwarfs, 20 objects outside every locus and 5 with too low a parallax S/N, in every
    // draw.
    constexpr int kDraws = 2000;
    auto tallies = fixedTallies(kDraws, 30, 10);
    const auto set = [&](photometry::UnclassifiedReason reason, std::uint32_t n) {
        const auto category = photometry::unclassifiedCategory(reason);
        std::fill_n(tallies.counts.begin() + static_cast<std::ptrdiff_t>(category * std::size_t{kDraws}),
                    kDraws, n);
    };
    set(photometry::UnclassifiedReason::OutsideLoci, 20);
    set(photometry::UnclassifiedReason::LowParallaxSnr, 5);
    const auto groups = census::standardClassGroups();
    const auto estimates = census::estimateFractions(tallies, {10.0}, {65}, {65.0}, groups,
                                                     census::populationDeviatesByRadius(tallies, groups, {}));
    const auto& estimate = estimates.at(0);
    CHECK(estimate.members.median == 65.0);
    CHECK(estimate.classified_members.median == 40.0);
    CHECK(estimate.unclassified_by_reason[0].median == 20.0); // outside_loci
    CHECK(estimate.unclassified_by_reason[1].median == 0.0);  // no_photometry
    CHECK(estimate.unclassified_by_reason[2].median == 5.0);  // low_parallax_snr
    const auto& g = estimate.groups[static_cast<std::size_t>(StellarClass::G)];
    CHECK(g.fraction.this_volume.median == doctest::Approx(30.0 / 65.0));
    REQUIRE(g.fraction_of_classified.has_value());
    CHECK(g.fraction_of_classified->this_volume.median == doctest::Approx(0.75));
    // Among the classified, G's share of the Jeffreys-Dirichlet is Beta(30.5, 10.5 + 10 * 1/2) (M and the
    // ten other classified classes): median 0.6654, 68% interval [0.5934, 0.7326]
    // (scipy.stats.beta(30.5, 15.5).median() and .ppf); tolerance for 8000 deviates.
    CHECK(g.fraction_of_classified->population.median == doctest::Approx(0.6654).epsilon(0.01));
    CHECK(g.fraction_of_classified->population.lo68 == doctest::Approx(0.5934).epsilon(0.015));
    CHECK(g.fraction_of_classified->population.hi68 == doctest::Approx(0.7326).epsilon(0.015));
    // The unclassified class itself has no share among the classified.
    CHECK_FALSE(estimate.groups[static_cast<std::size_t>(StellarClass::Unclassified)]
                    .fraction_of_classified.has_value());
    // The reasons are one class: its count is their sum.
    CHECK(estimate.groups[static_cast<std::size_t>(StellarClass::Unclassified)].count.this_volume.median ==
          25.0);
}
