#include "census/SystemFractions.h"

#include "census/mock/Neighbourhood.h"
#include "photometry/ClassGrid.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cstdio>
#include <stdexcept>
#include <unordered_map>

using namespace starcensus::census;
using starcensus::photometry::CatalogRow;

namespace {

struct MockMultiplicity {
    std::int64_t primaries = 0; // systems whose most massive catalogued member lies within the radius
    std::int64_t multiples = 0; // those with two or more catalogued members
};

/// The truth the census estimates, from the mock's own records: systems by system_source_id, the
/// primary as the census picks it (most massive catalogued member), its true distance.
MockMultiplicity mockMultiplicity(const mock::MockResult& mock, double radius_pc) {
    struct System {
        double primary_mass_msun = -1.0;
        double primary_distance_pc = 0.0;
        int catalogued = 0;
    };
    std::unordered_map<std::int64_t, System> systems;
    for (const mock::ObjectTruth& t : mock.truth) {
        if (!t.catalogued) {
            continue;
        }
        System& system = systems[t.system_source_id];
        ++system.catalogued;
        const double mass = t.stage == mock::MockStage::Giant ? 1e9 : t.mass_msun;
        if (mass > system.primary_mass_msun) {
            system.primary_mass_msun = mass;
            system.primary_distance_pc = t.distance_pc;
        }
    }
    MockMultiplicity result;
    for (const auto& [id, system] : systems) {
        if (system.primary_distance_pc <= radius_pc) {
            ++result.primaries;
            result.multiples += system.catalogued > 1 ? 1 : 0;
        }
    }
    return result;
}

SystemAnalysis analyseMock(const mock::MockResult& mock, double radius_pc, int draws, std::uint64_t seed) {
    SystemCensusInputs inputs;
    inputs.rows = mock.catalog;
    inputs.classifier = &starcensus::photometry::Classifier::shipped();
    inputs.radii_pc = {radius_pc};
    inputs.draws.draws = draws;
    inputs.draws.seed = seed;
    inputs.groups = standardClassGroups();
    return analyseSystems(inputs);
}

mock::MockSettings multipleMock(double radius_pc) {
    mock::MockSettings settings;
    settings.radius_max_pc = radius_pc;
    settings.wide_companion_fraction = 0.15;
    settings.wide_triple_share = 0.2;
    return settings;
}

} // namespace

TEST_CASE("SystemFractions: multiplicity intervals are the Jeffreys Beta posterior for a fixed count") {
    // 30 of 100 in every draw: Beta(30.5, 70.5) has mean 30.5 / 101 = 0.302 and sd
    // sqrt(0.302 * 0.698 / 102) = 0.0455 (exact arithmetic).
    const std::vector<double> multiples(500, 30.0), primaries(500, 100.0);
    Xoshiro256 random(7, 0);
    const MultiplicityShare share = multiplicityShare(multiples, primaries, 4, random);
    const TwoIntervals& intervals = share.fraction;
    CHECK(intervals.this_volume.median == doctest::Approx(0.3));
    CHECK(intervals.this_volume.lo95 == doctest::Approx(0.3));
    CHECK(intervals.population.median == doctest::Approx(0.3005).epsilon(0.02)); // Beta median ~ mean - skew
    CHECK(share.population_beta.alpha == doctest::Approx(30.5).epsilon(0.05));   // the posterior's own Beta
    CHECK(share.population_beta.beta == doctest::Approx(70.5).epsilon(0.05));
    CHECK((intervals.population.hi68 - intervals.population.lo68) / 2.0 ==
          doctest::Approx(0.0455).epsilon(0.05));
}

TEST_CASE("SystemFractions: given the census's own draws, the primaries' tallies are theirs less the "
          "companions', with the same results as drawing every primary") {
    const mock::MockResult mock = mock::simulateNeighbourhood(multipleMock(20.0), 4);
    const auto& classifier = starcensus::photometry::Classifier::shipped();
    const auto grid = starcensus::photometry::ClassGrid::fromClassifier(classifier);
    SystemCensusInputs inputs;
    inputs.rows = mock.catalog;
    inputs.classifier = &classifier;
    inputs.radii_pc = {10.0, 20.0};
    inputs.draws.draws = 200;
    inputs.draws.seed = 8;
    inputs.draws.threads = 2;
    inputs.groups = standardClassGroups();
    const PreparedSample sample(inputs.rows, inputs.radii_pc, inputs.membership, inputs.rules, 2, &classifier,
                                &grid);
    const DrawTallies tallies = drawSample(sample, grid, inputs.draws);
    const SystemAnalysis drawn = analyseSystems(inputs); // its own sample, every primary drawn
    inputs.sample = &sample;
    inputs.tallies = &tallies;
    const SystemAnalysis subtracted = analyseSystems(inputs);
    std::size_t companions = 0;
    for (const SystemRole role : subtracted.catalog.roles) {
        companions += role == SystemRole::Companion ? 1 : 0;
    }
    CHECK(companions > 20); // the subtraction has something to take off
    REQUIRE(drawn.radii.size() == 2);
    for (std::size_t r = 0; r < 2; ++r) {
        const auto same = [](const IntervalSummary& a, const IntervalSummary& b) {
            return a.median == b.median && a.lo68 == b.lo68 && a.hi68 == b.hi68 && a.lo95 == b.lo95 &&
                   a.hi95 == b.hi95;
        };
        CHECK(same(drawn.radii[r].all.primaries, subtracted.radii[r].all.primaries));
        CHECK(same(drawn.radii[r].all.resolved.fraction.population,
                   subtracted.radii[r].all.resolved.fraction.population));
        for (std::size_t g = 0; g < drawn.radii[r].primary_fractions.size(); ++g) {
            CHECK(same(drawn.radii[r].primary_fractions[g].count.population,
                       subtracted.radii[r].primary_fractions[g].count.population));
        }
    }
    // Tallies of another Monte Carlo (other draws) are refused.
    const DrawTallies fewer = drawSample(sample, grid, {.draws = 100, .seed = 8, .threads = 2});
    inputs.tallies = &fewer;
    CHECK_THROWS_AS(analyseSystems(inputs), std::invalid_argument);
}

TEST_CASE("SystemFractions: multiplicity population intervals cover the mocks' multiplicity over 50 seeds") {
    // Injection and recovery on our own simulator: the truth is the pooled multiplicity of the 50 mocks
    // (resolved systems with two or more catalogued members, primaries within 10 pc); the 95% population
    // interval of each mock should hold it in ~95% of them. 45 of 50 is the binomial 3.8% lower tail
    // (exact binomial sum, no source needed).
    constexpr double kRadiusPc = 10.0;
    constexpr int kSeeds = 50;
    std::int64_t pooled_primaries = 0, pooled_multiples = 0;
    std::vector<IntervalSummary> intervals;
    std::vector<double> resolved_primaries;
    for (int seed = 1; seed <= kSeeds; ++seed) {
        const mock::MockResult mock =
            mock::simulateNeighbourhood(multipleMock(15.0), static_cast<std::uint64_t>(seed));
        const MockMultiplicity truth = mockMultiplicity(mock, kRadiusPc);
        pooled_primaries += truth.primaries;
        pooled_multiples += truth.multiples;
        const SystemAnalysis analysis = analyseMock(mock, kRadiusPc, 100, static_cast<std::uint64_t>(seed));
        intervals.push_back(analysis.radii[0].all.resolved.fraction.population);
        resolved_primaries.push_back(analysis.radii[0].all.primaries.median);
    }
    const double truth = static_cast<double>(pooled_multiples) / static_cast<double>(pooled_primaries);
    const auto covered =
        std::count_if(intervals.begin(), intervals.end(), [&](const IntervalSummary& interval) {
            return interval.lo95 <= truth && truth <= interval.hi95;
        });
    double median_sum = 0.0;
    for (const auto& interval : intervals) {
        median_sum += interval.median;
    }
    std::printf(
        "mock multiplicity within %.0f pc: truth %.4f (%lld of %lld primaries, %d seeds); mean median "
        "estimate %.4f; 95%% population intervals covering it: %td of %d\n",
        kRadiusPc, truth, static_cast<long long>(pooled_multiples), static_cast<long long>(pooled_primaries),
        kSeeds, median_sum / kSeeds, covered, kSeeds);
    CHECK(covered >= 45);
}
