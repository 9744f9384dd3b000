#include "census/MonteCarlo.h"

#include "census/Random.h"
#include "census/RowClassification.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/ClassGrid.h"

#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>
#include <vector>

using namespace starcensus;
using photometry::StellarClass;

namespace {

// A toy classifier for exercising the engine (not a physical one): bright is K, faint is M, no colour is
// L, so each path through the grid is visible in the counts.
photometry::ClassGrid toyGrid() {
    using photometry::categoryOf;
    return photometry::ClassGrid(
        photometry::ClassGridAxes{},
        [](double, double abs_g) {
            return abs_g < 8.0 ? categoryOf(StellarClass::K, 55.0) : categoryOf(StellarClass::M, 63.0);
        },
        [](double) { return categoryOf(StellarClass::L, 71.0); });
}

std::vector<photometry::CatalogRow> toyStars(int n, std::uint64_t seed) {
    census::Xoshiro256 random(seed);
    std::vector<photometry::CatalogRow> rows(static_cast<std::size_t>(n));
    for (auto& row : rows) {
        row.parallax_mas = 40.0 + 120.0 * random.uniform();
        row.parallax_error_mas = 0.5 + 10.0 * random.uniform();
        row.g_mag = 6.0 + 8.0 * random.uniform();
        row.g_error_mag = 0.01;
        row.bp_mag = row.g_mag + 0.5;
        row.rp_mag = row.g_mag - 0.8;
        row.bp_error_mag = 0.02;
        row.rp_error_mag = 0.02;
    }
    return rows;
}

/// A star for the toy grid: BP-RP 1.3 with 1 mmag errors in BP and RP.
photometry::CatalogRow toyStar(double parallax_mas, double parallax_error_mas, double g_mag,
                               double g_error_mag) {
    photometry::CatalogRow row;
    row.parallax_mas = parallax_mas;
    row.parallax_error_mas = parallax_error_mas;
    row.g_mag = g_mag;
    row.g_error_mag = g_error_mag;
    row.bp_mag = g_mag + 0.5;
    row.rp_mag = g_mag - 0.8;
    row.bp_error_mag = 0.001;
    row.rp_error_mag = 0.001;
    return row;
}

/// A simulated neighbourhood out to radius_max_pc (injection and recovery) with the shipped classifier and
/// its grid, as the pipeline classifies it.
struct ShippedNeighbourhood {
    census::mock::MockResult mock;
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    photometry::ClassGrid grid = photometry::ClassGrid::fromClassifier(classifier);
};

ShippedNeighbourhood shippedNeighbourhood(double radius_max_pc, std::uint64_t seed) {
    census::mock::MockSettings settings;
    settings.radius_max_pc = radius_max_pc;
    return {census::mock::simulateNeighbourhood(settings, seed)};
}

} // namespace

TEST_CASE("Monte Carlo results do not depend on the thread count") {
    const auto rows = toyStars(3000, 7);
    const census::PreparedSample sample(rows, {10.0, 20.0}, census::MembershipSettings{},
                                        {.min_parallax_snr_to_classify = 0.0}, 1);
    const census::PreparedSample sample_threaded(rows, {10.0, 20.0}, census::MembershipSettings{},
                                                 {.min_parallax_snr_to_classify = 0.0}, 2);
    const auto grid = toyGrid();
    census::DrawSettings one_thread{.draws = 50, .seed = 11, .threads = 1};
    census::DrawSettings two_threads{.draws = 50, .seed = 11, .threads = 2};
    const auto a = census::drawSample(sample, grid, one_thread);
    const auto b = census::drawSample(sample_threaded, grid, two_threads);
    CHECK(a.counts == b.counts);
    CHECK(a.star_classes == b.star_classes);
    // Three threads (blocks handed out unevenly) and a progress display attached: still identical.
    ProgressCounters progress;
    const auto c =
        census::drawSample(sample, grid, {.draws = 50, .seed = 11, .threads = 3, .progress = &progress});
    CHECK(c.counts == a.counts);
    CHECK(c.star_classes == a.star_classes);
    CHECK(progress.items_done == 3000 * 50);
    CHECK(progress.items_total == 3000 * 50);
    two_threads.seed = 12;
    CHECK(census::drawSample(sample, grid, two_threads).counts != a.counts);
}

TEST_CASE("a sample prepared with its grid (no tables for the certain stars) draws the same tallies; "
          "ranges of stars drawn apart and appended equal one draw of all; selected stars draw as prepared") {
    // Stars from 6 to 25 pc with errors from 0.5 to 10 mas at radii 10 and 20 pc: some certain (near,
    // small errors, far from the K/M boundary), most drawn. Certainty decided when the sample is prepared
    // with the grid must give exactly what the draws decide without it.
    const auto rows = toyStars(3000, 5);
    const auto grid = toyGrid();
    const census::RowClassRules rules{.min_parallax_snr_to_classify = 0.0};
    const census::PreparedSample without_grid(rows, {10.0, 20.0}, census::MembershipSettings{}, rules, 2);
    const census::PreparedSample with_grid(rows, {10.0, 20.0}, census::MembershipSettings{}, rules, 2,
                                           nullptr, &grid);
    const census::DrawSettings settings{.draws = 40, .seed = 9, .threads = 2};
    const auto expected = census::drawSample(without_grid, grid, settings);
    const auto compact = census::drawSample(with_grid, grid, settings);
    CHECK(compact.counts == expected.counts);
    CHECK(compact.star_classes == expected.star_classes);
    // Blocks of uneven length, cut inside the 256-star blocks of the thread loop.
    auto appended = census::drawSample(with_grid, grid, settings, 0, 1000);
    census::appendTallies(appended, census::drawSample(with_grid, grid, settings, 1000, 1001));
    census::appendTallies(appended, census::drawSample(with_grid, grid, settings, 1001, 3000));
    CHECK(appended.counts == expected.counts);
    CHECK(appended.star_classes == expected.star_classes);
    // Stars selected from the prepared sample (reversed, every third) draw as the same rows prepared anew.
    std::vector<std::uint32_t> order;
    for (std::uint32_t s = 2999;; s -= 3) {
        order.push_back(s);
        if (s < 3) {
            break;
        }
    }
    const census::PreparedSample selected(with_grid, order);
    const census::PreparedSample prepared(rows, order, {10.0, 20.0}, census::MembershipSettings{}, rules, 1,
                                          nullptr, &grid);
    REQUIRE(selected.size() == order.size());
    CHECK(selected.probabilityWithin(5, 1) == with_grid.probabilityWithin(order[5], 1));
    const auto from_selected = census::drawSample(selected, grid, settings);
    const auto from_prepared = census::drawSample(prepared, grid, settings);
    CHECK(from_selected.counts == from_prepared.counts);
    CHECK(from_selected.star_classes == from_prepared.star_classes);
    // Each selected star draws from its row's stream: the selection and the other stars, drawn apart,
    // add up to one draw of all of them, star for star.
    std::vector<std::uint32_t> others;
    for (std::uint32_t s = 0; s < 3000; ++s) {
        if (s % 3 != 2) {
            others.push_back(s);
        }
    }
    const auto from_others = census::drawSample(census::PreparedSample(with_grid, others), grid, settings);
    for (std::size_t slot = 0; slot < expected.counts.size(); ++slot) {
        REQUIRE(from_selected.counts[slot] + from_others.counts[slot] == expected.counts[slot]);
    }
    for (std::size_t k = 0; k < order.size(); ++k) {
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            const auto stellar_class = static_cast<StellarClass>(c);
            REQUIRE(from_selected.star_classes.draws(k, stellar_class) ==
                    expected.star_classes.draws(order[k], stellar_class));
        }
    }
    // Another grid than the one the sample was prepared with is refused.
    CHECK_THROWS_AS(census::drawSample(with_grid, toyGrid(), settings), std::invalid_argument);
}

TEST_CASE("mean Monte Carlo counts equal the summed membership probabilities") {
    const auto rows = toyStars(4000, 3);
    const census::PreparedSample sample(rows, {10.0, 20.0}, census::MembershipSettings{},
                                        {.min_parallax_snr_to_classify = 0.0}, 0);
    const auto tallies = census::drawSample(sample, toyGrid(), {.draws = 400, .seed = 5, .threads = 0});
    for (std::size_t r = 0; r < 2; ++r) {
        double total = 0.0;
        for (int d = 0; d < tallies.draws; ++d) {
            for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
                total += tallies.count(d, r, static_cast<photometry::Category>(c));
            }
        }
        const double mean = total / tallies.draws;
        const double expected = sample.expectedCount(r);
        // Each draw's count is a sum of Bernoulli variables: the mean of 400 draws scatters by at most
        // sqrt(expected / 400) (binomial variance <= mean); allow 4 of those.
        CHECK(std::abs(mean - expected) < 4.0 * std::sqrt(expected / 400.0));
    }
}

TEST_CASE("stars too noisy to classify, or without colour, take the documented classes") {
    std::vector<photometry::CatalogRow> rows(2);
    rows[0].parallax_mas = 200.0; // 5 pc, M_G = 10 + 5 + 5 log10(0.2) = 11.5: toy class M
    rows[0].parallax_error_mas = 0.1;
    rows[0].g_mag = 10.0;
    rows[0].g_error_mag = 0.001;
    rows[1] = rows[0];
    rows[1].bp_mag = 10.5;
    rows[1].rp_mag = 9.2;
    const auto grid = toyGrid();
    const census::PreparedSample sample(rows, {10.0}, census::MembershipSettings{}, census::RowClassRules{},
                                        1);
    const auto tallies = census::drawSample(sample, grid, {.draws = 20, .seed = 1, .threads = 1});
    CHECK(tallies.classCount(0, 0, StellarClass::L) == 1); // no colour: magnitude-only grid
    CHECK(tallies.classCount(0, 0, StellarClass::M) == 1);
    const census::PreparedSample strict(rows, {10.0}, census::MembershipSettings{},
                                        {.min_parallax_snr_to_classify = 5000.0}, 1);
    CHECK(census::drawSample(strict, grid, {.draws = 20, .seed = 1, .threads = 1})
              .classCount(3, 0, StellarClass::Unclassified) == 2);
}

TEST_CASE("stars whose draws cannot differ are tallied in every draw; stars on a boundary are drawn") {
    // Toy grid: K brighter than M_G = 8, M fainter. Star 0 sits at M_G 11.5 (5 pc) with errors far too
    // small to reach the boundary and membership certain at 10 and 20 pc: it counts as M in every draw
    // at both radii (the tallies the shortcut writes). Star 1 sits at 50 +- 2 mas (the 20 pc boundary;
    // 25 sigma beyond 10 pc) and on the K/M boundary (M_G 8.0) with 0.3 mag errors: it is drawn, and splits
    // between inside and outside 20 pc and between K and M.
    // Star 1 at 20 pc: M_G = g - 5 log10(20 / 10) = g - 1.505.
    const std::vector<photometry::CatalogRow> rows = {toyStar(200.0, 0.01, 10.0, 0.001),
                                                      toyStar(50.0, 2.0, 9.505, 0.3)};
    const census::PreparedSample sample(rows, {10.0, 20.0}, census::MembershipSettings{},
                                        {.min_parallax_snr_to_classify = 0.0}, 1);
    REQUIRE(sample.probabilityWithin(0, 0) == 1.0f);
    REQUIRE(sample.probabilityWithin(0, 1) == 1.0f);
    const int draws = 400;
    const auto tallies = census::drawSample(sample, toyGrid(), {.draws = draws, .seed = 3, .threads = 1});
    const auto m = photometry::categoryOf(StellarClass::M, 63.0);
    const auto k = photometry::categoryOf(StellarClass::K, 55.0);
    int star1_k_within_20 = 0;
    int star1_within_20 = 0;
    for (int d = 0; d < draws; ++d) {
        CHECK(tallies.count(d, 0, m) == 1); // only star 0 is within 10 pc
        CHECK(tallies.count(d, 0, k) == 0);
        star1_k_within_20 += static_cast<int>(tallies.count(d, 1, k));
        star1_within_20 += static_cast<int>(tallies.count(d, 1, k) + tallies.count(d, 1, m)) - 1;
    }
    CHECK(tallies.star_classes.draws(0, StellarClass::M) == static_cast<std::uint32_t>(draws));
    // Star 1: about half its draws within 20 pc (binomial, 400 draws: 0.5 +- 0.025; allow 5 sigma), some
    // of them K and some M.
    const auto share = [&](int n) { return static_cast<double>(n) / draws; };
    CHECK(share(star1_within_20) == doctest::Approx(0.5).epsilon(0.25));
    CHECK(star1_k_within_20 > 0);
    CHECK(star1_k_within_20 < star1_within_20);
}

TEST_CASE("objects without Gaia photometry are drawn with the class sample.fits gives them") {
    // A T5 and an L5 dwarf seen only in 2MASS J and Ks (M_J and J-Ks of the shipped Pecaut & Mamajek
    // locus at 10 pc, parallax S/N 100): the exact classifier names them from the near infrared, and the
    // Monte Carlo, classifying at each distance quantile, must agree (it used to count them unclassified).
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    std::vector<photometry::CatalogRow> rows(2);
    const std::array<double, 2> codes = {85.0, 75.0};
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const double abs_j = classifier.locus().valueAtCode(photometry::LocusQuantity::AbsJMag, codes[i]);
        const double j_ks = classifier.locus().valueAtCode(photometry::LocusQuantity::JKsMag, codes[i]);
        REQUIRE(std::isfinite(abs_j));
        REQUIRE(std::isfinite(j_ks));
        rows[i].parallax_mas = 100.0;
        rows[i].parallax_error_mas = 1.0;
        rows[i].j_mag = abs_j;
        rows[i].ks_mag = abs_j - j_ks;
    }
    const census::MembershipSettings membership;
    const census::PreparedSample sample(rows, {20.0}, membership, census::RowClassRules{}, 1, &classifier);
    const auto grid = photometry::ClassGrid::fromClassifier(classifier);
    const auto tallies = census::drawSample(sample, grid, {.draws = 200, .seed = 3, .threads = 1});
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const photometry::Classification exact = census::classifyRow(rows[i], classifier, {});
        CAPTURE(i);
        CHECK(exact.stellar_class == (i == 0 ? StellarClass::T : StellarClass::L));
        const std::uint32_t same_class = tallies.star_classes.draws(i, exact.stellar_class);
        CHECK(same_class >= 100u); // probability of the sample.fits class at least 0.5
    }
    // Both are members in every draw, counted in their own class.
    CHECK(tallies.classCount(0, 0, StellarClass::T) == 1u);
    CHECK(tallies.classCount(0, 0, StellarClass::L) == 1u);
}

TEST_CASE("with a parallax S/N above 20, the Monte Carlo gives each object its sample.fits class in at least "
          "half the draws") {
    // A simulated 20 pc neighbourhood (seed 21; injection and recovery), classified as the pipeline does it
    // (exact classifier for sample.fits; grid, quantile tables and fixed classes in the draws). Objects on a
    // class boundary with small errors, or late M/L dwarfs the near infrared names, used to get the grid
    // cell's class instead.
    const auto [mock, classifier, grid] = shippedNeighbourhood(20.0, 21);
    const census::RowClassRules rules;
    const census::PreparedSample sample(mock.catalog, {20.0}, {}, rules, 2, &classifier, &grid);
    constexpr int kDraws = 200;
    const auto tallies = census::drawSample(sample, grid, {.draws = kDraws, .seed = 4, .threads = 2});
    int checked = 0;
    int below_half = 0;
    for (std::size_t s = 0; s < mock.catalog.size(); ++s) {
        const auto& row = mock.catalog[s];
        if (!(row.parallax_mas > 20.0 * row.parallax_error_mas)) {
            continue;
        }
        ++checked;
        const auto exact = census::classifyRow(row, classifier, rules);
        const std::uint32_t same = tallies.star_classes.draws(s, exact.stellar_class);
        // At least half, less the binomial noise of 200 draws for an object exactly on a boundary (true
        // share 0.5, standard deviation 0.035): 0.4 is 2.8 sigma.
        if (same < static_cast<std::uint32_t>(0.4 * kDraws)) {
            ++below_half;
            MESSAGE("row ", s, ": ", photometry::className(exact.stellar_class), " in ", same, " of ",
                    kDraws);
        }
    }
    CHECK(checked > 1000);
    CHECK(below_half == 0);
}

TEST_CASE("per-star class counts hold 255 draws in 8 bits, 65,535 in 16 and more in 32") {
    // Each star draws from its own stream, so N + 1 draws repeat the N and add one: per star, the class
    // counts of the two runs differ by exactly one draw, and each run's counts sum to its draws (a counter
    // too narrow would wrap at 256 or 65,536).
    const auto rows = toyStars(12, 5);
    const census::PreparedSample sample(rows, {10.0, 20.0}, census::MembershipSettings{},
                                        {.min_parallax_snr_to_classify = 0.0}, 1);
    const auto grid = toyGrid();
    for (const int draws : {255, 65535}) {
        CAPTURE(draws);
        const auto narrow = census::drawSample(sample, grid, {.draws = draws, .seed = 4, .threads = 2});
        const auto wide = census::drawSample(sample, grid, {.draws = draws + 1, .seed = 4, .threads = 2});
        for (std::size_t s = 0; s < rows.size(); ++s) {
            CAPTURE(s);
            std::uint32_t narrow_sum = 0, wide_sum = 0;
            int classes_one_more = 0, classes_changed = 0;
            for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
                const auto stellar_class = static_cast<StellarClass>(c);
                const std::uint32_t before = narrow.star_classes.draws(s, stellar_class);
                const std::uint32_t after = wide.star_classes.draws(s, stellar_class);
                narrow_sum += before;
                wide_sum += after;
                classes_changed += after != before ? 1 : 0;
                classes_one_more += after == before + 1 ? 1 : 0;
            }
            CHECK(narrow_sum == static_cast<std::uint32_t>(draws));
            CHECK(wide_sum == static_cast<std::uint32_t>(draws + 1));
            CHECK(classes_changed == 1);
            CHECK(classes_one_more == 1);
        }
    }
}

TEST_CASE("a sample whose draw tables are released keeps its membership and refuses to draw") {
    const auto rows = toyStars(600, 8);
    census::PreparedSample sample(rows, {10.0, 20.0}, census::MembershipSettings{},
                                  {.min_parallax_snr_to_classify = 0.0}, 2);
    const census::PreparedSample kept(rows, {10.0, 20.0}, census::MembershipSettings{},
                                      {.min_parallax_snr_to_classify = 0.0}, 2);
    sample.releaseDrawTables();
    REQUIRE(sample.size() == rows.size());
    for (std::size_t s = 0; s < rows.size(); ++s) {
        REQUIRE(sample.probabilityWithin(s, 0) == kept.probabilityWithin(s, 0));
        REQUIRE(sample.probabilityWithin(s, 1) == kept.probabilityWithin(s, 1));
    }
    CHECK(sample.expectedCount(1) == kept.expectedCount(1));
    CHECK_THROWS_AS(census::drawSample(sample, toyGrid(), {.draws = 10}), std::logic_error);
    const std::vector<std::uint32_t> order = {3, 1};
    CHECK_THROWS_AS(census::PreparedSample(sample, order), std::logic_error);
}

TEST_CASE("a sample drawn as it is prepared gives drawSample's tallies for any thread count and keeps no "
          "draw tables") {
    // A simulated 30 pc neighbourhood (seed 23) with the shipped classifier and grid, at 10, 20 and 30 pc:
    // certain stars, Gaussian and gridded posteriors, tabulated categories (near-infrared and boundary
    // stars) and fixed classes all occur.
    const auto [mock, classifier, grid] = shippedNeighbourhood(30.0, 23);
    const census::RowClassRules rules;
    const std::vector<double> radii = {10.0, 20.0, 30.0};
    const census::PreparedSample prepared(mock.catalog, radii, {}, rules, 2, &classifier, &grid);
    const census::DrawSettings settings{.draws = 60, .seed = 5, .threads = 1};
    const auto expected = census::drawSample(prepared, grid, settings);
    REQUIRE(mock.catalog.size() > 2000);
    for (const unsigned threads : {1u, 2u, 3u}) {
        CAPTURE(threads);
        ProgressCounters progress;
        census::DrawSettings threaded = settings;
        threaded.threads = threads;
        threaded.progress = &progress;
        const census::DrawnSample drawn =
            census::prepareAndDraw(mock.catalog, radii, {}, rules, classifier, grid, threaded);
        CHECK(drawn.tallies.counts == expected.counts);
        CHECK(drawn.tallies.star_classes == expected.star_classes);
        CHECK(progress.items_done == static_cast<std::int64_t>(mock.catalog.size()) * settings.draws);
        REQUIRE(drawn.sample.size() == prepared.size());
        for (std::size_t r = 0; r < radii.size(); ++r) {
            CHECK(drawn.sample.expectedCount(r) == prepared.expectedCount(r));
        }
        CHECK_THROWS_AS(census::drawSample(drawn.sample, grid, settings), std::logic_error);
    }
    census::DrawSettings without_classes = settings;
    without_classes.per_star_classes = false;
    const census::DrawnSample drawn =
        census::prepareAndDraw(mock.catalog, radii, {}, rules, classifier, grid, without_classes);
    CHECK(drawn.tallies.counts == expected.counts);
    CHECK(drawn.tallies.star_classes.empty());
}

TEST_CASE("a star whose every draw gives one category draws only its membership") {
    // Toy grid (K brighter than M_G = 8, M fainter). At 50 +- 2 mas (the 20 pc boundary), M_G ~ 11.5 with
    // 1 mmag errors: every outcome its errors allow is M, so the draws decide only whether it is inside
    // 20 pc. It must be M in every draw, inside in about half (binomial, 2000 draws: 0.5 +- 0.011; the
    // posterior's own P(d < 20 pc) within 5 sigma), and draw the same with or without the grid given to
    // the sample (the two ways the certainty test is made).
    const std::vector<photometry::CatalogRow> rows = {toyStar(50.0, 2.0, 13.0, 0.001)};
    const auto grid = toyGrid();
    const census::RowClassRules rules{.min_parallax_snr_to_classify = 0.0};
    const census::PreparedSample with_grid(rows, {20.0}, census::MembershipSettings{}, rules, 1, nullptr,
                                           &grid);
    const census::PreparedSample without_grid(rows, {20.0}, census::MembershipSettings{}, rules, 1);
    const float within = with_grid.probabilityWithin(0, 0);
    REQUIRE(within > 0.3f);
    REQUIRE(within < 0.7f);
    const int draws = 2000;
    const census::DrawSettings settings{.draws = draws, .seed = 17, .threads = 1};
    const auto tallies = census::drawSample(with_grid, grid, settings);
    CHECK(tallies.counts == census::drawSample(without_grid, grid, settings).counts);
    const auto m = photometry::categoryOf(StellarClass::M, 63.0);
    int inside = 0;
    for (int d = 0; d < draws; ++d) {
        CHECK(tallies.classCount(d, 0, StellarClass::K) == 0u);
        inside += static_cast<int>(tallies.count(d, 0, m));
    }
    CHECK(tallies.star_classes.draws(0, StellarClass::M) == static_cast<std::uint32_t>(draws));
    const double sigma = std::sqrt(within * (1.0 - within) / draws);
    CHECK(std::abs(static_cast<double>(inside) / draws - within) < 5.0 * sigma);
}
