#include "census/Completeness.h"
#include "census/CompletenessCorrection.h"
#include "census/LuminosityFunction.h"
#include "census/MassFunctionFit.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/ClassGrid.h"
#include "tests/census/MockSample.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::census;
using namespace starcensus::census::mock;
using starcensus::photometry::StellarClass;

namespace {

ClassGroup groupNamed(const std::string& name) {
    for (const ClassGroup& group : standardClassGroups()) {
        if (group.name == name) {
            return group;
        }
    }
    FAIL("no group " << name);
    return {};
}

std::int64_t totalOf(const RadiusCounts& counts) {
    std::int64_t total = 0;
    for (const auto n : counts.all) {
        total += n;
    }
    return total;
}

} // namespace

TEST_CASE("V/Vmax is 0.5 for a complete mock and well below when the magnitude limit cuts the volume") {
    // Schmidt 1968 (ApJ 151, 393): V/Vmax is uniform on [0, 1] for a complete sample, mean 0.5 +-
    // 1/sqrt(12 N). The M dwarfs of a 25 pc mock, true distances and magnitudes.
    constexpr double kRadiusPc = 25.0;
    const ClassGroup m_dwarfs = groupNamed("M");
    const MagnitudeLimits assumed{20.7, 3.0}; // the default limits the analysis assumes
    const CompletenessSettings settings;

    const MockResult complete = simulateNeighbourhood(MockSettings{}, 12);
    const auto complete_stars = testing::truthStars(complete);
    const VOverVmax v_complete = vOverVmax(complete_stars, m_dwarfs, kRadiusPc, assumed);
    MESSAGE("complete mock: M V/Vmax = " << v_complete.mean << " +- " << v_complete.sigma << " (N "
                                         << v_complete.n_effective << ")");
    CHECK(v_complete.n_effective > 3000);
    CHECK(v_complete.sigma == doctest::Approx(1.0 / std::sqrt(12.0 * v_complete.n_effective)));
    CHECK(std::abs(v_complete.mean - 0.5) < 3.0 * v_complete.sigma);
    CHECK(completenessRadiusPc(complete_stars, m_dwarfs, kRadiusPc, settings) == doctest::Approx(kRadiusPc));

    // The same sky with a survey that stops at G = 14: late M dwarfs (M_G 12.5-16.4) vanish beyond
    // 2-13 pc, but the analysis still assumes G = 20.7.
    MockSettings shallow;
    shallow.g_limit_mag = 14.0;
    const MockResult cut = simulateNeighbourhood(shallow, 12);
    const auto cut_stars = testing::truthStars(cut);
    const VOverVmax v_cut = vOverVmax(cut_stars, m_dwarfs, kRadiusPc, assumed);
    MESSAGE("G < 14 mock: M V/Vmax = " << v_cut.mean << " +- " << v_cut.sigma);
    CHECK((0.5 - v_cut.mean) / v_cut.sigma > 5.0); // more than 5 sigma below 0.5
    const double radius_cut = completenessRadiusPc(cut_stars, m_dwarfs, kRadiusPc, settings);
    MESSAGE("G < 14 mock: M completeness radius " << radius_cut << " pc");
    CHECK(radius_cut < 0.8 * kRadiusPc);
    // With the true limit the test passes again: V/Vmax measures the limit, not the class.
    const VOverVmax v_true_limit = vOverVmax(cut_stars, m_dwarfs, kRadiusPc, {14.0, 3.0});
    CHECK(std::abs(v_true_limit.mean - 0.5) < 3.0 * v_true_limit.sigma);
    // The turnover of the G histogram finds the survey's limit.
    std::vector<double> g_mags;
    for (const auto& row : cut.catalog) {
        g_mags.push_back(row.g_mag);
    }
    CHECK(estimateFaintLimitMag(g_mags, settings) == doctest::Approx(14.0).epsilon(0.02));
    // M_lim = 14 - 5 log10(25 / 10) = 12.01: the M subtypes from M5 on fall outside.
    const RadiusCompleteness assessed = assessCompleteness(
        cut_stars, kRadiusPc, {m_dwarfs}, {14.0, 3.0},
        categoryAbsGRanges(starcensus::photometry::shippedModelPhotometry(), settings), settings);
    CHECK(assessed.complete_abs_g_mag[1] == doctest::Approx(14.0 - 5.0 * std::log10(2.5)));
    CHECK_FALSE(assessed.groups[0].complete);
    CHECK(assessed.groups[0].subtypes_outside.front() == "M4"); // M4V-M5V spans M_G 11.2-12.45
}

TEST_CASE("corrected fractions of a mock whose faint limit hides the L and T dwarfs recover the truth") {
    // A 25 pc mock (Kroupa 2001 IMF, 30% binaries) seen by a survey that stops at G = 17: at 20 pc
    // M_lim = 15.5, so all L (M_G >= 16.6) and T dwarfs beyond a few pc are lost. The pipeline path:
    // membership, Monte Carlo tallies with the class grid, the classifier's luminosity function, a
    // Kroupa fit over the complete range, and the correction for the faint limit.
    // Caveat: the truth of the L/T/Y classes comes from the simulator's approximate brown-dwarf cooling
    // law, which the model shares (census/MassFunctionFit.h), so this checks the bookkeeping of the
    // correction and its intervals, not brown-dwarf physics. White dwarfs are not corrected (no model),
    // and the classifier loses some faint ones, so they are not checked here.
    MockSettings settings;
    settings.g_limit_mag = 17.0;
    const MockResult mock = simulateNeighbourhood(settings, 11);
    const std::vector<double> radii = {10.0, 20.0};
    const PreparedSample sample(mock.catalog, radii, {}, RowClassRules{}, 2);
    const auto grid =
        starcensus::photometry::ClassGrid::fromClassifier(starcensus::photometry::Classifier::shipped());
    DrawSettings draws;
    draws.draws = 200;
    const DrawTallies tallies = drawSample(sample, grid, draws);

    const MagnitudeLimits limits{17.0, 3.0};
    const auto stars = testing::classifiedStars(mock, sample, 1);
    const auto table = estimateLuminosityFunction(stars, 20.0, limits, 0.01, {});
    const LuminosityModel model(settings.imf.mass_min_msun, settings.imf.mass_max_msun, {},
                                starcensus::photometry::shippedModelPhotometry());
    MassFunctionFitSettings fit_settings;
    fit_settings.family = ImfFamily::Kroupa2001;
    const MassFunctionFitResult fit = fitMassFunction(table, model, 20.0, limits, fit_settings);
    REQUIRE(fit.converged);

    const auto groups = standardClassGroups();
    const auto corrected = correctForCompleteness(tallies, radii, groups, model, fit, {17.0, -1e9}, 5);
    REQUIRE(corrected.size() == 2);
    const auto truth = countWithinRadii(mock.truth, radii);
    for (std::size_t r = 0; r < radii.size(); ++r) {
        const double total = static_cast<double>(totalOf(truth[r]));
        for (const StellarClass c : {StellarClass::M, StellarClass::L, StellarClass::T}) {
            const auto index = static_cast<std::size_t>(c);
            const CorrectedGroup& group = corrected[r].groups[index];
            REQUIRE(group.name == starcensus::photometry::className(c));
            const double true_fraction = static_cast<double>(truth[r].all[index]) / total;
            CAPTURE(radii[r]);
            CAPTURE(group.name);
            MESSAGE(radii[r] << " pc " << group.name << ": truth " << truth[r].all[index] << " ("
                             << truth[r].catalogued[index] << " catalogued), completeness "
                             << group.completeness << ", corrected count " << group.count.median << " ["
                             << group.count.lo95 << ", " << group.count.hi95 << "], fraction truth "
                             << true_fraction << " corrected " << group.fraction.median << " ["
                             << group.fraction.lo95 << ", " << group.fraction.hi95 << "]");
            CHECK(group.fraction.lo95 <= true_fraction);
            CHECK(group.fraction.hi95 >= true_fraction);
        }
        // Most L and T dwarfs were hidden: the correction did the work.
        const auto l_index = static_cast<std::size_t>(StellarClass::L);
        const auto t_index = static_cast<std::size_t>(StellarClass::T);
        CHECK(truth[r].catalogued[l_index] + truth[r].catalogued[t_index] <
              0.4 * static_cast<double>(truth[r].all[l_index] + truth[r].all[t_index]));
        CHECK(corrected[r].groups[l_index].completeness < 0.3);
        CHECK(corrected[r].groups[static_cast<std::size_t>(StellarClass::K)].completeness ==
              doctest::Approx(1.0));
        CHECK(
            std::isnan(corrected[r].groups[static_cast<std::size_t>(StellarClass::WhiteDwarf)].completeness));
    }
    // Draws spread over three threads give the same numbers (each draw has its own stream).
    const auto threaded = correctForCompleteness(tallies, radii, groups, model, fit, {17.0, -1e9}, 5, 3);
    for (std::size_t r = 0; r < radii.size(); ++r) {
        for (std::size_t g = 0; g < groups.size(); ++g) {
            CHECK(threaded[r].groups[g].count.median == corrected[r].groups[g].count.median);
            CHECK(threaded[r].groups[g].fraction.lo95 == corrected[r].groups[g].fraction.lo95);
            CHECK(threaded[r].groups[g].missing.hi68 == corrected[r].groups[g].missing.hi68);
        }
        CHECK(threaded[r].total.hi95 == corrected[r].total.hi95);
    }
}
