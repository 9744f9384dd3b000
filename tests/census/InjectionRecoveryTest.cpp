// Injection and recovery of type fractions: simulate mock neighbourhoods with known truth, run the
// census (membership, Monte Carlo over measurement errors, population intervals) and check that the
// quoted intervals cover the truth at the quoted rate.
#include "census/Fractions.h"
#include "census/MonteCarlo.h"
#include "census/QualityCuts.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"

#include <doctest/doctest.h>

#include <array>
#include <cmath>
#include <sstream>
#include <unordered_map>

using namespace starcensus;
using photometry::StellarClass;

namespace {

constexpr double kRadiusPc = 10.0;

struct Trial {
    std::vector<census::RadiusEstimate> estimates;
    std::array<std::int64_t, photometry::kClassCount> true_counts{}; // catalogued objects within R
    std::int64_t true_total = 0;
};

Trial runTrial(std::uint64_t seed, const photometry::ClassGrid& grid) {
    census::mock::MockSettings mock_settings;
    mock_settings.radius_max_pc = 14.0; // beyond R, so stars can scatter in and out of the volume
    const census::mock::MockResult mock = census::mock::simulateNeighbourhood(mock_settings, seed);
    Trial trial;
    for (const auto& object : mock.truth) {
        if (object.catalogued && object.distance_pc < kRadiusPc) {
            ++trial.true_counts[static_cast<std::size_t>(object.true_class)];
            ++trial.true_total;
        }
    }
    std::vector<photometry::CatalogRow> rows = mock.catalog;
    census::QualitySettings quality;
    quality.max_ruwe = 0.0; // the mock's RUWE marks binaries; keep every object so the truth is comparable
    census::applyQualityCuts(rows, quality);
    const census::PreparedSample sample(
        rows, {kRadiusPc}, census::MembershipSettings{},
        {.min_parallax_snr_to_classify = quality.min_parallax_snr_to_classify}, 1,
        &photometry::Classifier::shipped());
    const census::DrawTallies tallies =
        census::drawSample(sample, grid, {.draws = 100, .seed = seed, .threads = 1});
    const auto groups = census::standardClassGroups();
    trial.estimates =
        census::estimateFractions(tallies, {kRadiusPc}, {0}, {sample.expectedCount(0)}, groups,
                                  census::populationDeviatesByRadius(tallies, groups, {.seed = seed}));
    return trial;
}

} // namespace

TEST_CASE("population 68% intervals of type fractions cover the truth over 200 seeded mocks") {
    const auto grid = photometry::ClassGrid::fromClassifier(photometry::Classifier::shipped());
    constexpr int kMocks = 200;
    std::vector<Trial> trials;
    std::array<std::int64_t, photometry::kClassCount> pooled{};
    std::int64_t pooled_total = 0;
    for (int m = 0; m < kMocks; ++m) {
        trials.push_back(runTrial(1000 + static_cast<std::uint64_t>(m), grid));
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            pooled[c] += trials.back().true_counts[c];
        }
        pooled_total += trials.back().true_total;
    }
    // The true population fraction of a class among catalogued objects: the pooled truth of all 200
    // mocks (about 60,000 objects, so its own error is ~0.002, small against the 68% half-widths).
    std::ostringstream table;
    table << "class  true_fraction  mean_recovered  coverage68  coverage95\n";
    for (const StellarClass c :
         {StellarClass::G, StellarClass::K, StellarClass::M, StellarClass::WhiteDwarf}) {
        const auto index = static_cast<std::size_t>(c);
        const double truth = static_cast<double>(pooled[index]) / static_cast<double>(pooled_total);
        int covered68 = 0;
        int covered95 = 0;
        double mean_recovered = 0.0;
        for (const auto& trial : trials) {
            const auto& population = trial.estimates[0].groups[index].fraction.population;
            covered68 += population.lo68 <= truth && truth <= population.hi68 ? 1 : 0;
            covered95 += population.lo95 <= truth && truth <= population.hi95 ? 1 : 0;
            mean_recovered += population.median / kMocks;
        }
        const double coverage68 = static_cast<double>(covered68) / kMocks;
        const double coverage95 = static_cast<double>(covered95) / kMocks;
        table << photometry::className(c) << "  " << truth << "  " << mean_recovered << "  " << coverage68
              << "  " << coverage95 << "\n";
        // 200 trials: the coverage of a 68.3% interval scatters by 3.3%, so 60-76% is a ~2.5-sigma band.
        CHECK_MESSAGE(coverage68 >= 0.60, photometry::className(c));
        CHECK_MESSAGE(coverage68 <= 0.76, photometry::className(c));
        CHECK_MESSAGE(coverage95 >= 0.90, photometry::className(c));
        // Recovered fractions agree with the truth: the mean over mocks within 3 standard errors of it
        // plus 0.005 for the classifier's boundary losses.
        CHECK_MESSAGE(std::abs(mean_recovered - truth) <
                          3.0 * std::sqrt(truth * (1 - truth) / (290.0 * kMocks)) + 0.005,
                      photometry::className(c));
    }
    MESSAGE(table.str());
}

TEST_CASE("rules of thumb on a mock at the usual local density") {
    // Common practice, no source: about 400 objects within 30 light years (9.2 pc) at ~0.1 systems per
    // pc^3 (4/3 pi 9.2^3 * 0.1 = 326 systems, ~420 objects with companions); M dwarfs about three
    // quarters of the stars. Loose checks on the recovered census of one 25 pc mock.
    const census::mock::MockResult mock =
        census::mock::simulateNeighbourhood(census::mock::MockSettings{}, 7);
    std::int64_t objects_within = 0;
    for (const auto& object : mock.truth) {
        objects_within += object.distance_pc < 9.2 ? 1 + (object.binary ? 1 : 0) : 0;
    }
    CHECK(objects_within > 300);
    CHECK(objects_within < 550);

    const auto grid = photometry::ClassGrid::fromClassifier(photometry::Classifier::shipped());
    std::vector<photometry::CatalogRow> rows = mock.catalog;
    const census::PreparedSample sample(rows, {20.0}, census::MembershipSettings{}, census::RowClassRules{},
                                        0, &photometry::Classifier::shipped());
    const auto tallies = census::drawSample(sample, grid, {.draws = 100, .seed = 7, .threads = 0});
    const auto standard_groups = census::standardClassGroups();
    const auto estimates =
        census::estimateFractions(tallies, {20.0}, {0}, {sample.expectedCount(0)}, standard_groups,
                                  census::populationDeviatesByRadius(tallies, standard_groups, {}));
    const auto& groups = estimates[0].groups;
    const auto count = [&](StellarClass c) {
        return groups[static_cast<std::size_t>(c)].count.this_volume.median;
    };
    double stars = 0.0;
    for (const StellarClass c :
         {StellarClass::O, StellarClass::B, StellarClass::A, StellarClass::F, StellarClass::G,
          StellarClass::K, StellarClass::M, StellarClass::WhiteDwarf, StellarClass::Evolved}) {
        stars += count(c);
    }
    const double m_share = count(StellarClass::M) / stars;
    MESSAGE("M dwarfs among recovered stars within 20 pc: " << m_share);
    CHECK(m_share > 0.65);
    CHECK(m_share < 0.85);
}
