// Injection and recovery through two overlapping catalogues: a mock's Gaia-like file and its companion
// catalogue (ultracool dwarfs with WISE and follow-up photometry, bright stars with Hipparcos-like
// astrometry; positions at J2000.0, no source_id) are written as FITS, read back without --column flags,
// merged by position at J2016.0 and run through the census (membership, Monte Carlo, intervals). The truth
// is each mock's count of objects in either file within the radius.
#include "census/CatalogMerge.h"
#include "census/CensusOptions.h"
#include "census/Fractions.h"
#include "census/LuminosityAnalysis.h"
#include "census/Membership.h"
#include "census/MonteCarlo.h"
#include "census/QualityCuts.h"
#include "census/mock/Neighbourhood.h"
#include "census/mock/Output.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"
#include "photometry/ModelPhotometry.h"
#include "photometry/catalog/CatalogScan.h"

#include <doctest/doctest.h>

#include <array>
#include <filesystem>
#include <limits>
#include <sstream>

using namespace starcensus;
using photometry::StellarClass;

namespace {

constexpr double kRadiusPc = 10.0;

struct MergedTrial {
    std::array<std::int64_t, photometry::kClassCount> true_counts{}; // in either file, within R
    std::int64_t truth_overlap = 0;                                  // objects in both files (all radii)
    std::int64_t positional_merges = 0;
    std::int64_t source_id_merges = 0;
    std::int64_t wrong_merges = 0; // links joining rows of two different true objects
    census::RadiusEstimate estimate;
};

MergedTrial runMergedTrial(std::uint64_t seed, const photometry::ClassGrid& grid) {
    census::mock::MockSettings settings;
    settings.radius_max_pc = 14.0; // beyond R, so objects can scatter in and out of the volume
    settings.companion.enabled = true;
    const census::mock::MockResult mock = census::mock::simulateNeighbourhood(settings, seed);
    MergedTrial trial;
    for (const auto& object : mock.truth) {
        trial.truth_overlap += object.catalogued && object.in_companion ? 1 : 0;
        if ((object.catalogued || object.in_companion) && object.distance_pc < kRadiusPc) {
            ++trial.true_counts[static_cast<std::size_t>(object.true_class)];
        }
    }
    const auto directory =
        std::filesystem::temp_directory_path() / ("starcensus_merged_census_" + std::to_string(seed));
    std::filesystem::create_directories(directory);
    const std::string gaia_path = (directory / "mock.fits").string();
    const std::string companion_path = (directory / "companion.fits").string();
    census::mock::writeMockCatalog(gaia_path, mock);
    census::mock::writeCompanionCatalog(companion_path, mock);
    photometry::ScanSettings scan_settings; // every row with a parallax is a candidate
    scan_settings.threads = 1;
    photometry::CatalogScan scan = photometry::scanCatalogs({gaia_path, companion_path}, scan_settings);
    std::filesystem::remove_all(directory);

    census::CatalogMergeSettings merge_settings;
    merge_settings.file_epochs_yr = {census::kGaiaDr3EpochYr, settings.companion.epoch_yr};
    census::MergedCatalog merged = census::mergeCatalogRows(std::move(scan.candidates), merge_settings, 1);
    trial.positional_merges = merged.report.positional_merges;
    trial.source_id_merges = merged.report.source_id_merges;
    // The true object of each row: the Gaia-like rows by source_id, the companion's by its row.
    std::vector<std::int64_t> companion_source_ids(mock.companion_catalog.size());
    for (const auto& object : mock.truth) {
        if (object.in_companion) {
            companion_source_ids[static_cast<std::size_t>(object.companion_row)] = object.source_id;
        }
    }
    const auto source_of = [&](std::uint32_t file, std::int64_t row) {
        const auto index = static_cast<std::size_t>(row);
        return file == 0 ? mock.catalog[index].source_id : companion_source_ids[index];
    };
    for (const auto& link : merged.report.links) {
        trial.wrong_merges +=
            source_of(link.kept_file, link.kept_row) != source_of(link.absorbed_file, link.absorbed_row) ? 1
                                                                                                         : 0;
    }
    std::vector<photometry::CatalogRow> rows = std::move(merged.rows);
    census::QualitySettings quality;
    census::applyQualityCuts(rows, quality);
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    const census::PreparedSample sample(
        rows, {kRadiusPc}, census::MembershipSettings{},
        {.min_parallax_snr_to_classify = quality.min_parallax_snr_to_classify}, 1, &classifier, &grid);
    const census::DrawTallies tallies =
        census::drawSample(sample, grid, {.draws = 200, .seed = seed, .threads = 1});
    const auto groups = census::standardClassGroups();
    trial.estimate = census::estimateFractions(
        tallies, {kRadiusPc}, census::hardCutCounts(rows, {kRadiusPc}, census::MembershipSettings{}),
        {sample.expectedCount(0)}, groups,
        census::populationDeviatesByRadius(tallies, groups, {.seed = seed}))[0];
    return trial;
}

} // namespace

TEST_CASE("merged Gaia-like and companion catalogues recover the truth of every class, T and Y included") {
    const auto grid = photometry::ClassGrid::fromClassifier(photometry::Classifier::shipped());
    constexpr int kMocks = 20;
    std::vector<MergedTrial> trials;
    std::array<double, photometry::kClassCount> mean_truth{};
    std::int64_t overlap = 0;
    std::int64_t unmerged = 0;
    for (int m = 0; m < kMocks; ++m) {
        trials.push_back(runMergedTrial(5000 + static_cast<std::uint64_t>(m), grid));
        const MergedTrial& trial = trials.back();
        // No object of the overlap is counted twice: every positional merge joins the two rows of one
        // true object, nothing merges by source_id (the companion has none), and every object in both
        // files is merged except the pairs the 3-sigma parallax test keeps apart: 0.27% of true pairs
        // for Gaussian errors, so 2 per ~120-object overlap is a generous bound.
        CHECK(trial.wrong_merges == 0);
        CHECK(trial.source_id_merges == 0);
        CHECK(trial.truth_overlap > 50);
        CHECK(trial.positional_merges <= trial.truth_overlap);
        CHECK(trial.positional_merges >= trial.truth_overlap - 2);
        overlap += trial.truth_overlap;
        unmerged += trial.truth_overlap - trial.positional_merges;
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            mean_truth[c] += static_cast<double>(trial.true_counts[c]) / kMocks;
        }
    }
    // The expected count of each class in either file within R is the mean over the mocks (its own error,
    // sqrt(count / 20), is a quarter of an interval's 1-sigma half-width). The population intervals of the
    // counts (Poisson sampling of the volume plus the measurement draws, Fractions.h) cover it at about
    // the quoted rates: over 20 mocks a 95% rate gives 17-20 (binomial, 2.5% in the lower tail), a 68.3%
    // rate 10-18 (two-sided 99%) (common practice, no source).
    std::ostringstream table;
    table << "class  mean_truth  mean_recovered  covered68  covered95  (of " << kMocks << " mocks)\n";
    for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
        if (mean_truth[c] < 0.2) { // fewer than 4 objects in 20 mocks (O stars, unclassified): no test
            continue;
        }
        int covered68 = 0;
        int covered95 = 0;
        double mean_recovered = 0.0;
        for (const MergedTrial& trial : trials) {
            const auto& count = trial.estimate.groups[c].count.population;
            covered68 += count.lo68 <= mean_truth[c] && mean_truth[c] <= count.hi68 ? 1 : 0;
            covered95 += count.lo95 <= mean_truth[c] && mean_truth[c] <= count.hi95 ? 1 : 0;
            mean_recovered += trial.estimate.groups[c].count.this_volume.median / kMocks;
        }
        table << photometry::kClassNames[c] << "  " << mean_truth[c] << "  " << mean_recovered << "  "
              << covered68 << "  " << covered95 << "\n";
        CHECK_MESSAGE(covered95 >= 17, photometry::kClassNames[c]);
        if (mean_truth[c] >= 2.0) { // below, counts of 0-2 make the coverage discrete and above the rate
            CHECK_MESSAGE(covered68 >= 10, photometry::kClassNames[c]);
            CHECK_MESSAGE(covered68 <= 18, photometry::kClassNames[c]);
        }
    }
    // The T and Y dwarfs are there, and their fractions are nonzero in every mock.
    for (const StellarClass c : {StellarClass::T, StellarClass::Y}) {
        const auto index = static_cast<std::size_t>(c);
        CHECK(mean_truth[index] > 5.0);
        for (const MergedTrial& trial : trials) {
            CHECK(trial.estimate.groups[index].fraction.population.lo95 > 0.0);
        }
    }
    table << "overlap " << overlap << " objects, " << unmerged << " kept apart by the parallax test\n";
    MESSAGE(table.str());
}

TEST_CASE("completeness correction of a merged input: objects another catalogue found are not added again") {
    // A 25 pc mock and its companion, merged in memory (no spectral types read: photometric classes).
    // The Gaia-like file misses most T and Y dwarfs beyond a few pc; the companion lists those WISE sees.
    // The correction's model predicts the ones the G survey cannot see; the members the companion
    // supplied beyond that limit are taken off, so the corrected counts stay near the truth of all
    // objects instead of adding the companion's dwarfs a second time. Caveat as in CompletenessTest.cpp:
    // the brown-dwarf truth comes from the model's own cooling law, so this checks the bookkeeping.
    census::mock::MockSettings settings;
    settings.companion.enabled = true;
    const census::mock::MockResult mock = census::mock::simulateNeighbourhood(settings, 29);
    std::vector<photometry::CatalogRow> rows = mock.catalog;
    for (const auto& companion : mock.companion_catalog) {
        rows.push_back(companion.row);
        rows.back().file_index = 1;
    }
    census::CatalogMergeSettings merge_settings;
    merge_settings.file_epochs_yr = {census::kGaiaDr3EpochYr, settings.companion.epoch_yr};
    rows = census::mergeCatalogRows(std::move(rows), merge_settings, 1).rows;
    census::CensusSettings census_settings;
    census_settings.radii_text = "10,20";
    census::validate(census_settings);
    census_settings.draws.draws = 100;
    census_settings.draws.threads = 1;
    census::LuminosityRunSettings luminosity;
    luminosity.fit_models_text = "kroupa";
    census::validate(luminosity);
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    const auto grid = photometry::ClassGrid::fromClassifier(classifier);
    const census::PreparedSample sample(rows, census_settings.radii_pc, census_settings.membership,
                                        census::rowClassRules(census_settings), 1, &classifier, &grid);
    const census::DrawTallies tallies = census::drawSample(sample, grid, census_settings.draws);
    const census::LuminosityAnalysis analysis =
        census::analyseLuminosity(rows, sample, tallies, classifier, census_settings, luminosity);
    REQUIRE(analysis.corrected.size() == 2);
    REQUIRE(analysis.correction_fit.has_value());
    // The same correction without taking off what the companion found (as before merged inputs).
    const census::LuminosityModel model(luminosity.fit.start.mass_min_msun,
                                        luminosity.fit.start.mass_max_msun, luminosity.model,
                                        photometry::shippedModelPhotometry());
    const auto uncorrected_for_merge = census::correctForCompleteness(
        tallies, census_settings.radii_pc, census_settings.groups, model,
        analysis.fits[*analysis.correction_fit],
        {analysis.limits.faint_g_mag, -std::numeric_limits<double>::infinity()}, census_settings.draws.seed);
    const auto truth = census::mock::countWithinRadii(mock.truth, census_settings.radii_pc);
    for (std::size_t r = 0; r < 2; ++r) {
        for (const StellarClass c : {StellarClass::L, StellarClass::T, StellarClass::Y}) {
            const auto index = static_cast<std::size_t>(c);
            const auto& count = analysis.corrected[r].groups[index].count;
            const double double_counted = uncorrected_for_merge[r].groups[index].count.median;
            const auto all = static_cast<double>(truth[r].all[index]);
            MESSAGE(census_settings.radii_pc[r]
                    << " pc " << photometry::className(c) << ": truth " << all << " ("
                    << truth[r].in_any_file[index] << " in a file), corrected " << count.median << " ["
                    << count.lo95 << ", " << count.hi95 << "], without the merge's members "
                    << double_counted);
            // Never below what the files hold; within 20% of the truth of all objects: the model's brown
            // dwarfs (fitted density, the cooling-law approximation) differ from the mock's by ~10-20%, and
            // the 95% interval carries only the fit's and Poisson's noise, not that systematic (measured:
            // 4-12% high with the colour classifier for rows without BP-RP; 4-18% high with the best match
            // over bands, 20 pc T 829.5 against 702, whose interval misses the truth; README, Limitations).
            CHECK(count.median >= static_cast<double>(truth[r].in_any_file[index]) - 2.0);
            if (c != StellarClass::Y || r == 1) {
                CHECK(std::abs(count.median - all) <= 0.20 * all + 2.0);
            }
        }
    }
    // The Y dwarfs: the companion holds only those its W2 limit reaches (82 of 223 within 20 pc), so most
    // of the corrected count is the model's; at 20 pc it covers the truth inside its 95% interval
    // (measured: 218 [188.3, 251.7] against 223). Within 10 pc this mock has 16 Y dwarfs where its own
    // 20 pc count implies 28 (a 2.3-sigma Poisson low), and the correction, which estimates the
    // population's number, gives 29 [20, 37]: no check of the 10 pc count against this one volume.
    const auto y_index = static_cast<std::size_t>(StellarClass::Y);
    const auto& y_count = analysis.corrected[1].groups[y_index].count;
    CHECK(y_count.lo95 <= static_cast<double>(truth[1].all[y_index]));
    CHECK(static_cast<double>(truth[1].all[y_index]) <= y_count.hi95);
    // Without taking them off, the T dwarfs the companion supplied would be counted about twice.
    const auto t_index = static_cast<std::size_t>(StellarClass::T);
    CHECK(uncorrected_for_merge[1].groups[t_index].count.median >
          1.5 * static_cast<double>(truth[1].all[t_index]));
}
