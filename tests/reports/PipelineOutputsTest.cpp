#include "census/mock/Neighbourhood.h"
#include "census/mock/Output.h"
#include "photometry/base/InputError.h"
#include "reports/CensusPipeline.h"
#include "reports/DrawsOutput.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <fstream>
#include <sstream>

using namespace starcensus;
using starcensus::testing::runReferencePython;
using starcensus::testing::ScratchDirectory;

namespace {

/// A mock 8 pc neighbourhood written as a FITS catalog, and pipeline settings for it.
reports::PipelineSettings mockRun(const std::filesystem::path& directory) {
    census::mock::MockSettings mock_settings;
    mock_settings.wide_companion_fraction = 0.15; // resolved systems for systems.fits
    mock_settings.radius_max_pc = 8.0;
    const auto mock = census::mock::simulateNeighbourhood(mock_settings, 314);
    census::mock::writeMockCatalog(directory / "mock.fits", mock);
    reports::PipelineSettings settings;
    settings.inputs = {(directory / "mock.fits").string()};
    settings.output_directory = directory / "out";
    settings.census.radii_text = "4,6";
    settings.census.draws.draws = 1000;
    settings.census.draws.seed = 5;
    settings.census.group_definitions = {"FGK=F,G,K", "earlyM=M0-M4"};
    census::validate(settings.census);
    settings.options = {{"options", {{"radius", "4,6"}}}, {"options_given", {"radius"}}};
    return settings;
}

std::vector<std::string> filesIn(const std::filesystem::path& directory) {
    std::vector<std::string> names;
    if (std::filesystem::exists(directory)) {
        for (const auto& entry : std::filesystem::directory_iterator(directory)) {
            names.push_back(entry.path().filename().string());
        }
    }
    std::sort(names.begin(), names.end());
    return names;
}

} // namespace

TEST_CASE(
    "a run writes every output atomically; astropy and scipy read them back with the documented columns") {
    ScratchDirectory scratch("starcensus-pipeline-outputs");
    const auto settings = mockRun(scratch.path());
    std::ostringstream log;
    const auto result = reports::runCensusPipeline(settings, log);
    // Every output and nothing else (no temporary ".partial-" files); no progress without a terminal.
    CHECK(filesIn(settings.output_directory) ==
          std::vector<std::string>{"completeness.json", "draws.csv", "draws.fits", "fractions.csv",
                                   "fractions.json", "hosts.fits", "lumfunc.csv", "lumfunc_fit.json",
                                   "priors.json", "provenance.json", "sample.fits", "systems.fits"});
    CHECK(log.str().empty());

    const auto checked = nlohmann::json::parse(
        runReferencePython("check_census_outputs.py", settings.output_directory.string()));
    // hosts.fits: the columns of README (Outputs), p >= 0.5 within the largest radius.
    const std::vector<std::string> host_columns = {
        "source_id",      "file_index",  "row_index",   "ra",         "dec",      "parallax",
        "parallax_error", "g",           "abs_g",       "bp_rp",      "class",    "spectral_type",
        "teff",           "teff_error",  "mass",        "mass_error", "p_member", "class_probability",
        "system_id",      "system_role", "system_flags"};
    CHECK(checked["hosts"]["columns"].get<std::vector<std::string>>() == host_columns);
    CHECK(checked["hosts"]["units"]["teff_error"] == "K");
    // systems.fits against sample.fits, read back with astropy: one row per system, members and roles
    // consistent with the members' own rows.
    CHECK(checked["systems"]["rows"] == result.systems);
    CHECK(checked["systems"]["members_agree"] == true);
    CHECK(checked["systems"]["roles_agree"] == true);
    CHECK(checked["systems"]["members_width"] == checked["systems"]["longest_members"]);
    MESSAGE("systems.fits: " << checked["systems"].dump());
    CHECK(checked["hosts"]["units"]["mass"] == "solMass");
    CHECK(checked["hosts"]["hostrad_pc"] == 6.0);
    CHECK(checked["hosts"]["rows"] == result.hosts);
    CHECK(result.hosts > 50); // 0.1 systems pc^-3 x 905 pc^3 within 6 pc, most catalogued
    CHECK(checked["hosts"]["min_p_member"].get<double>() >= 0.5);
    // draws.fits: one row per radius and draw, count and fraction columns per class and group.
    CHECK(checked["draws"]["rows"] == 2 * 1000);
    CHECK(checked["draws"]["columns"].get<std::vector<std::string>>() ==
          reports::drawColumnNames(settings.census.groups));
    CHECK(checked["draws"]["columns"][3] == "n_O");
    CHECK(checked["draws"]["columns"].back() == "f_earlyM");
    CHECK(checked["draws"]["members_equal_class_sums"] == true);
    CHECK(checked["draws"]["fractions_sum_to_one"] == true);
    // priors.json against scipy.stats: the Dirichlet marginals (beta.ppf with alpha_c, a0 - alpha_c) and
    // the groups' Betas give the stored quantiles within 0.01 in fraction (the tolerance). The
    // densities' gamma.cdf at the stored quantiles is compared with the levels; with 4000 deviates a
    // stored quantile's level scatters by sqrt(0.25 / 4000) = 0.008, so the bound is 0.01 + 7 sigma (the
    // tight density round trip, with 20000 deviates, is in tests/census/PriorsTest.cpp).
    MESSAGE("priors against scipy: " << checked["priors"].dump());
    CHECK(checked["priors"]["dirichlet_fraction"].get<double>() <= 0.01);
    CHECK(checked["priors"]["group_beta_fraction"].get<double>() <= 0.01);
    CHECK(checked["priors"]["gamma_level"].get<double>() <= 0.07);

    // draws.csv has the same columns and rows as draws.fits.
    std::ifstream csv(settings.output_directory / "draws.csv");
    std::string header;
    std::getline(csv, header);
    CHECK(header.rfind("radius_pc,draw,members,n_O,", 0) == 0);
    std::size_t lines = 0;
    for (std::string line; std::getline(csv, line);) {
        ++lines;
    }
    CHECK(lines == 2 * 1000);

    // provenance.json: the input's size and checksum, the options, the seed, the timings.
    std::ifstream provenance_file(settings.output_directory / "provenance.json");
    const auto provenance = nlohmann::json::parse(provenance_file);
    CHECK(provenance["schema"] == "starcensus.provenance/1");
    CHECK(provenance["seed"] == 5);
    CHECK(provenance["inputs"][0]["size_bytes"] == std::filesystem::file_size(scratch.path() / "mock.fits"));
    CHECK(provenance["inputs"][0]["xxh128"] ==
          runReferencePython("checksum_file.py", "xxh128 " + (scratch.path() / "mock.fits").string())
              .substr(0, 32));
    CHECK(provenance["command_options"]["options"]["radius"] == "4,6");
    CHECK(provenance["timings_s"]["draws"].get<double>() > 0.0);
    CHECK(provenance["settings"]["match_radius_arcsec"] == 2.0);
    CHECK(provenance["settings"]["catalog_epoch_yr"] == 2016.0);
    CHECK(provenance["merges"]["rows_in"] == result.scan_totals.candidates);
    CHECK(provenance["merges"]["rows_out"] == result.scan_totals.candidates); // one file: nothing merged
    CHECK(provenance["merges"]["file_pairs"].empty());
    CHECK(reports::summarizeRun(result).find("  merged " + std::to_string(result.scan_totals.candidates) +
                                             " candidate rows into " +
                                             std::to_string(result.scan_totals.candidates) +
                                             " objects: 0 by source_id, 0 by position") != std::string::npos);
    // hosts, luminosity, systems and the tables run inside the outputs stage, side by side.
    CHECK(provenance["timings_s"]["luminosity"].get<double>() > 0.0);
    for (const char* stage : {"hosts", "systems", "tables"}) {
        CAPTURE(stage);
        CHECK(provenance["timings_s"][stage].get<double>() <=
              provenance["timings_s"]["outputs"].get<double>());
    }
    CHECK(provenance["timings_s"]["systems"].get<double>() > 0.0);
    CHECK(provenance["timings_s"]["tables"].get<double>() > 0.0);
    std::ifstream priors_file(settings.output_directory / "priors.json");
    CHECK(nlohmann::json::parse(priors_file)["schema"] == "starcensus.priors/1");
}

TEST_CASE(
    "a failed run leaves no output: bad --hosts-radius, no candidates, an output that cannot be written") {
    ScratchDirectory scratch("starcensus-pipeline-failures");
    auto settings = mockRun(scratch.path());
    std::ostringstream log;

    settings.hosts.radius_pc = 5.0;
    CHECK_THROWS_WITH_AS(reports::runCensusPipeline(settings, log),
                         "--hosts-radius: 5 pc is not one of the census radii (--radius)", InputError);
    CHECK(filesIn(settings.output_directory).empty());
    settings.hosts.radius_pc = 4.0;

    auto far_away = settings;
    std::ofstream(scratch.path() / "empty.csv")
        << "source_id,ra,dec,parallax,parallax_error,phot_g_mean_mag\n"
           "1,10.0,20.0,0.5,0.1,12.0\n";
    far_away.inputs = {(scratch.path() / "empty.csv").string()};
    CHECK_THROWS_AS(reports::runCensusPipeline(far_away, log), InputError);
    CHECK(filesIn(settings.output_directory).empty());

    // A directory in the way of priors.json: the error names it and no temporary file stays behind.
    std::filesystem::create_directories(settings.output_directory / "priors.json" / "blocker");
    CHECK_THROWS_WITH_AS(reports::runCensusPipeline(settings, log), doctest::Contains("priors.json"),
                         InputError);
    for (const auto& name : filesIn(settings.output_directory)) {
        CHECK(name.find(".partial-") == std::string::npos);
    }
    CHECK(std::filesystem::is_directory(settings.output_directory / "priors.json" / "blocker"));
}

TEST_CASE("with progress on, each stage is announced on the log with its time") {
    ScratchDirectory scratch("starcensus-pipeline-progress");
    auto settings = mockRun(scratch.path());
    settings.show_progress = true;
    std::ostringstream log;
    reports::runCensusPipeline(settings, log);
    const std::string text = log.str();
    for (const char* stage :
         {"[1/4] scan ...", "[2/4] posteriors ...", "[3/4] draws ...", "[4/4] outputs ..."}) {
        CHECK(text.find(stage) != std::string::npos);
    }
    CHECK(std::count(text.begin(), text.end(), '\n') == 4);
}
