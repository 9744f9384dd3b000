// The executable on bad input: one line on stderr naming the file, column or option, exit status 2,
// and no output file left behind.
#include "census/CatalogMerge.h"
#include "census/mock/Neighbourhood.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <algorithm>
#include <array>
#include <csignal>
#include <cstdio>
#include <fcntl.h>
#include <filesystem>
#include <fstream>
#include <map>
#include <span>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>

namespace {

struct Outcome {
    int exit_code;
    std::string stderr_text;
    std::string stdout_text;
};

std::string takeFile(const std::filesystem::path& path) {
    std::ifstream stream(path);
    std::string text((std::istreambuf_iterator<char>(stream)), std::istreambuf_iterator<char>());
    std::filesystem::remove(path);
    return text;
}

Outcome runStarcensus(const std::string& arguments, const std::filesystem::path& directory) {
    const std::filesystem::path stderr_path = directory / "stderr.txt";
    const std::filesystem::path stdout_path = directory / "stdout.txt";
    const std::string command = "cd '" + directory.string() + "' && '" + STARCENSUS_EXECUTABLE + "' " +
                                arguments + " > '" + stdout_path.string() + "' 2> '" + stderr_path.string() +
                                "'";
    const int status = std::system(command.c_str());
    const std::string stderr_text = takeFile(stderr_path);
    return {WIFEXITED(status) ? WEXITSTATUS(status) : -1, stderr_text, takeFile(stdout_path)};
}

/// The lines after the line `heading` that are indented by four blanks, without the indent.
std::vector<std::string> blockAfter(const std::string& text, const std::string& heading) {
    std::istringstream stream(text);
    std::vector<std::string> lines;
    std::string line;
    bool inside = false;
    while (std::getline(stream, line)) {
        if (inside && line.rfind("    ", 0) == 0) {
            lines.push_back(line.substr(4));
        } else if (inside) {
            break;
        } else {
            inside = line == heading;
        }
    }
    return lines;
}

std::string readFile(const std::filesystem::path& path) {
    std::ifstream stream(path, std::ios::binary);
    return {(std::istreambuf_iterator<char>(stream)), std::istreambuf_iterator<char>()};
}

std::size_t lineCount(const std::string& text) {
    return static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n'));
}

nlohmann::json jsonFile(const std::filesystem::path& path) {
    std::ifstream stream(path);
    return nlohmann::json::parse(stream);
}

/// Catalogue rows as CSV with reader-recognised column names; with_source_id false leaves the column
/// out. Full precision, so the values read back are the ones written; NaN is written "nan" (missing).
void writeCsvCatalog(const std::filesystem::path& path,
                     std::span<const starcensus::photometry::CatalogRow> rows, bool with_source_id) {
    std::ofstream out(path);
    out.precision(17);
    out << (with_source_id ? "source_id," : "")
        << "ra,dec,parallax,parallax_error,pmra,pmdec,g_mag,g_mag_error,bp_mag,bp_mag_error,rp_mag,"
           "rp_mag_error,j_mag,j_mag_error,h_mag,h_mag_error,ks_mag,ks_mag_error,ruwe\n";
    for (const auto& row : rows) {
        if (with_source_id) {
            out << row.source_id << ',';
        }
        out << row.ra_deg << ',' << row.dec_deg << ',' << row.parallax_mas << ',' << row.parallax_error_mas
            << ',' << row.pmra_mas_per_yr << ',' << row.pmdec_mas_per_yr << ',' << row.g_mag << ','
            << row.g_error_mag << ',' << row.bp_mag << ',' << row.bp_error_mag << ',' << row.rp_mag << ','
            << row.rp_error_mag << ',' << row.j_mag << ',' << row.j_error_mag << ',' << row.h_mag << ','
            << row.h_error_mag << ',' << row.ks_mag << ',' << row.ks_error_mag << ',' << row.ruwe << '\n';
    }
}

bool directoryHasFiles(const std::filesystem::path& directory) {
    return std::filesystem::exists(directory) && !std::filesystem::is_empty(directory);
}

} // namespace

TEST_CASE("bad input stops the run with one line naming the culprit and writes nothing") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli");
    const auto& dir = scratch.path();
    {
        std::ofstream not_fits(dir / "notes.fits");
        not_fits << "this is not a FITS file\n";
        std::ofstream plain_file(dir / "a_file");
        std::filesystem::create_directory(dir / "a_directory");
        std::ofstream far_star(dir / "far.csv"); // one star at 1 kpc: no candidate within 10 pc
        far_star << "ra,dec,parallax,parallax_error,g_mag\n10,20,1.0,0.1,12\n";
        std::ofstream negative_seed(dir / "negative_seed.ini");
        negative_seed << "seed = -1\n";
    }
    struct Case {
        const char* arguments;
        const char* expected; // part of the message
    };
    const std::array<Case, 24> cases = {{
        {"run a_directory --out out", "a_directory: is a directory"},
        {"run notes.fits --out a_file", "--out a_file: exists and is not a directory"},
        {"run missing.fits --out out", "missing.fits"},
        {"run notes.fits --out out", "notes.fits"},
        {"run notes.fits --radius -5 --out out", "--radius"},
        {"run notes.fits --draws 0 --out out", "--draws"},
        {"run notes.fits --checksum md5 --out out", "--checksum"},
        {"run notes.fits --no-such-option 1 --out out", "no-such-option"},
        {"inspect", "--input"},
        {"run notes.fits --match-radius -1 --out out", "--match-radius: -1 is outside the allowed range"},
        {"run notes.fits --file-epoch notes.fits --out out", "--file-epoch: 'notes.fits' is not FILE=YEAR"},
        {"run notes.fits --file-epoch notes.fits=J2000 --out out", "--file-epoch: 'notes.fits=J2000' is not"},
        {"run notes.fits --system-chance-max 2 --out out",
         "--system-chance-max: 2 is outside the allowed range"},
        {"run notes.fits --system-sky-shift 3 --out out",
         "--system-sky-shift: 3 is outside the allowed range"},
        {"simulate --wide-fraction 1.5 --out mock.fits", "--wide-fraction: 1.5 is outside the allowed range"},
        // Unsigned options: Boost would wrap "-1" to 2^64 - 1.
        {"run notes.fits --seed -1 --out out", "--seed -1: must be a non-negative integer"},
        {"run notes.fits --config negative_seed.ini --out out", "--seed -1: must be a non-negative integer"},
        {"run notes.fits --seed=-7 --out out", "--seed -7: must be a non-negative integer"},
        {"simulate --seed -3 --out out/mock.fits", "--seed -3: must be a non-negative integer"},
        // Numbers in messages as written ("10 pc", not "10.000000 pc").
        {"run far.csv --radius 5,10 --out out", "can lie within 10 pc"},
        {"run notes.fits --radius 5,20 --prior-outer-distance 15 --out out", "largest radius (20 pc)"},
        {"run notes.fits --radius 5,10 --hosts-radius 7.5 --out out", "--hosts-radius: 7.5 pc is not one of"},
        {"nonsense", "unknown command 'nonsense'"},
        {"run notes.fits --config missing.ini --out out", "--config: cannot read missing.ini"},
    }};
    for (const auto& test : cases) {
        const Outcome outcome = runStarcensus(test.arguments, dir);
        CAPTURE(test.arguments);
        CAPTURE(outcome.stderr_text);
        CHECK(outcome.exit_code == 2);
        CHECK(lineCount(outcome.stderr_text) == 1);
        CHECK(outcome.stderr_text.find(test.expected) != std::string::npos);
        CHECK(outcome.stderr_text.rfind("starcensus: error: ", 0) == 0);
        CHECK_FALSE(directoryHasFiles(dir / "out"));
    }
}

TEST_CASE("a mock run end to end: simulate, inspect and run exit 0 and write complete outputs") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-run");
    const auto& dir = scratch.path();
    REQUIRE(runStarcensus("simulate --out mock.fits --truth truth.json --radius-max 12 --seed 3", dir)
                .exit_code == 0);
    CHECK(runStarcensus("inspect mock.fits", dir).exit_code == 0);
    REQUIRE(runStarcensus("run mock.fits --radius 5,10 --draws 50 --out out", dir).exit_code == 0);
    for (const char* name : {"sample.fits", "fractions.json", "fractions.csv"}) {
        CHECK(std::filesystem::is_regular_file(dir / "out" / name));
    }
    for (const auto& entry : std::filesystem::directory_iterator(dir / "out")) {
        CHECK(entry.path().string().find(".partial-") == std::string::npos); // no temporary left behind
    }
    CHECK(std::filesystem::is_regular_file(dir / "out" / "hosts.fits"));

    // Fractions only: no host list, no mass-function fit (so no corrected fractions), no checksum.
    REQUIRE(runStarcensus("run mock.fits --radius 5,10 --draws 50 --no-report --no-hosts --lf-fit none "
                          "--checksum none --out lean",
                          dir)
                .exit_code == 0);
    CHECK_FALSE(std::filesystem::exists(dir / "lean" / "hosts.fits"));
    CHECK(std::filesystem::is_regular_file(dir / "lean" / "lumfunc.csv"));
    std::ifstream fit_file(dir / "lean" / "lumfunc_fit.json");
    CHECK(nlohmann::json::parse(fit_file)["fits"].empty());
    std::ifstream provenance_file(dir / "lean" / "provenance.json");
    const auto provenance = nlohmann::json::parse(provenance_file);
    CHECK_FALSE(provenance["inputs"][0].contains("xxh128"));
    CHECK(std::find(provenance["outputs"].begin(), provenance["outputs"].end(), "hosts.fits") ==
          provenance["outputs"].end());
    // The report is still written from what the run left.
    CHECK(runStarcensus("report lean", dir).exit_code == 0);
    CHECK(std::filesystem::is_regular_file(dir / "lean" / "report.html"));

    // Without the system census: the same object census (fractions and draws byte for byte), no
    // systems.fits, no system columns in sample.fits, no system sections; the report still renders.
    const Outcome no_systems = runStarcensus("run mock.fits --radius 5,10 --draws 50 --no-report --no-hosts "
                                             "--lf-fit none --checksum none --no-systems --out bare",
                                             dir);
    REQUIRE(no_systems.exit_code == 0);
    CHECK(no_systems.stdout_text.find("  systems: not searched (--no-systems)\n") != std::string::npos);
    for (const char* name : {"fractions.csv", "draws.csv", "draws.fits"}) {
        CHECK(readFile(dir / "bare" / name) == readFile(dir / "lean" / name));
    }
    CHECK_FALSE(std::filesystem::exists(dir / "bare" / "systems.fits"));
    CHECK(readFile(dir / "lean" / "sample.fits").find("'system_id'") != std::string::npos);
    CHECK(readFile(dir / "bare" / "sample.fits").find("'system_id'") == std::string::npos);
    const auto bare_fractions = jsonFile(dir / "bare" / "fractions.json");
    CHECK(jsonFile(dir / "lean" / "fractions.json").contains("system_finding"));
    CHECK_FALSE(bare_fractions.contains("system_finding"));
    CHECK_FALSE(bare_fractions["radii"][0].contains("systems"));
    CHECK_FALSE(jsonFile(dir / "bare" / "priors.json")["radii"][0].contains("system_primaries"));
    const auto bare_outputs = jsonFile(dir / "bare" / "provenance.json")["outputs"];
    CHECK(std::find(bare_outputs.begin(), bare_outputs.end(), "systems.fits") == bare_outputs.end());
    CHECK(runStarcensus("report bare", dir).exit_code == 0);
    CHECK(std::filesystem::is_regular_file(dir / "bare" / "report.html"));
}

TEST_CASE("overlapping inputs count each star once: the same file twice, and a mock split in two") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-merge");
    const auto& dir = scratch.path();
    starcensus::census::mock::MockSettings mock_settings;
    mock_settings.radius_max_pc = 12.0;
    const auto mock = starcensus::census::mock::simulateNeighbourhood(mock_settings, 3);
    const std::span<const starcensus::photometry::CatalogRow> catalog(mock.catalog);
    writeCsvCatalog(dir / "full.csv", catalog, true);
    const std::string run_options =
        " --radius 5,10 --draws 200 --no-report --no-hosts --lf-fit none --checksum none";
    REQUIRE(runStarcensus("run full.csv" + run_options + " --out once", dir).exit_code == 0);
    const std::string fractions_once = readFile(dir / "once" / "fractions.csv");
    const auto provenance_once = jsonFile(dir / "once" / "provenance.json");
    const auto candidates = provenance_once["merges"]["rows_out"].get<std::int64_t>();
    CHECK(provenance_once["merges"]["rows_in"] == candidates); // nothing to merge in one mock
    CHECK(provenance_once["merges"]["by_position"] == 0);

    // The same file twice, once through a "./" detour: read once, one warning line.
    const Outcome twice = runStarcensus("run full.csv ./full.csv" + run_options + " --out twice", dir);
    REQUIRE(twice.exit_code == 0);
    CHECK(twice.stderr_text ==
          "starcensus: warning: ./full.csv: the same file as full.csv, given earlier; read once\n");
    CHECK(readFile(dir / "twice" / "fractions.csv") == fractions_once);

    // A copy under another name is another file: every row comes back by its source_id.
    std::filesystem::copy_file(dir / "full.csv", dir / "copy.csv");
    REQUIRE(runStarcensus("run full.csv copy.csv" + run_options + " --out copy", dir).exit_code == 0);
    CHECK(readFile(dir / "copy" / "fractions.csv") == fractions_once);
    const auto copy_merges = jsonFile(dir / "copy" / "provenance.json")["merges"];
    CHECK(copy_merges["by_source_id"] == candidates);
    CHECK(copy_merges["by_position"] == 0);
    CHECK(copy_merges["rows_out"] == candidates);

    // Split in two overlapping thirds: rows [0, 2n/3) as they are; rows [n/3, n) at J2000.0 (positions
    // moved back with their proper motions), without source_id. Injection and recovery: the merged run
    // gives the single-file fractions.
    const std::size_t n = catalog.size();
    writeCsvCatalog(dir / "near.csv", catalog.first(2 * n / 3), true);
    std::vector<starcensus::photometry::CatalogRow> older(
        catalog.begin() + static_cast<std::ptrdiff_t>(n / 3), catalog.end());
    for (auto& row : older) {
        const auto moved = starcensus::census::positionAtEpoch(row, 2016.0, 2000.0);
        row.ra_deg = moved.ra_deg;
        row.dec_deg = moved.dec_deg;
    }
    writeCsvCatalog(dir / "far_j2000.csv", older, false);
    const Outcome split = runStarcensus(
        "run near.csv far_j2000.csv --file-epoch far_j2000.csv=2000" + run_options + " --out split", dir);
    REQUIRE(split.exit_code == 0);
    CHECK(split.stderr_text.empty());
    CHECK(readFile(dir / "split" / "fractions.csv") == fractions_once);
    const auto split_merges = jsonFile(dir / "split" / "provenance.json")["merges"];
    CHECK(split_merges["rows_out"] == candidates);
    CHECK(split_merges["by_source_id"] == 0);
    CHECK(split_merges["by_position"].get<std::int64_t>() > 0);
    CHECK(split_merges["rows_in"].get<std::int64_t>() - split_merges["by_position"].get<std::int64_t>() ==
          candidates);
    REQUIRE(split_merges["file_pairs"].size() == 1);
    CHECK(split_merges["file_pairs"][0]["by_position"] == split_merges["by_position"]);
    MESSAGE("split mock: " << split_merges.dump());
    // The same through the INI file (value "FILE=YEAR" after the first '=').
    {
        std::ofstream ini(dir / "merge.ini");
        ini << "file-epoch = far_j2000.csv=2000\nmatch-radius = 2\n";
    }
    REQUIRE(
        runStarcensus("run near.csv far_j2000.csv --config merge.ini" + run_options + " --out split_ini", dir)
            .exit_code == 0);
    CHECK(readFile(dir / "split_ini" / "fractions.csv") == fractions_once);
    // Without the epoch the fast movers are missed and counted twice.
    REQUIRE(runStarcensus("run near.csv far_j2000.csv" + run_options + " --out no_epoch", dir).exit_code ==
            0);
    const auto no_epoch_merges = jsonFile(dir / "no_epoch" / "provenance.json")["merges"];
    MESSAGE("split mock without --file-epoch: " << no_epoch_merges.dump());
    CHECK(no_epoch_merges["rows_out"].get<std::int64_t>() > candidates);
    // A --file-epoch naming no input is a user error.
    const Outcome unknown =
        runStarcensus("run near.csv --file-epoch other.csv=2000" + run_options + " --out bad", dir);
    CHECK(unknown.exit_code == 2);
    CHECK(unknown.stderr_text == "starcensus: error: --file-epoch other.csv: not one of the input files\n");
    CHECK_FALSE(directoryHasFiles(dir / "bad"));
}

TEST_CASE("simulate --companion-out: the companion catalogue maps without --column and merges once") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-companion");
    const auto& dir = scratch.path();
    const Outcome simulated = runStarcensus(
        "simulate --out mock.fits --companion-out companion.fits --truth truth.json --radius-max 12 --seed 3",
        dir);
    REQUIRE(simulated.exit_code == 0);
    CHECK(simulated.stdout_text.find("wrote mock.fits, companion.fits and truth.json") != std::string::npos);
    // Every companion column feeds its field by UCD or name.
    const Outcome inspected = runStarcensus("inspect companion.fits", dir);
    REQUIRE(inspected.exit_code == 0);
    for (const char* mapped :
         {"parallax        parallax        UCD", "pmra            pmra            UCD",
          "b               bmag            name", "v               vmag            UCD",
          "w1              w1mpro          UCD", "w2              w2mpro          UCD",
          "spectral_type   spectral_type   UCD", "j               j_m             UCD"}) {
        CHECK_MESSAGE(inspected.stdout_text.find(mapped) != std::string::npos, mapped);
    }
    // The truth's overlap: objects in both files (all within 12 pc, so every row is a candidate of a
    // 30 pc run).
    const auto truth = jsonFile(dir / "truth.json");
    std::int64_t overlap = 0;
    for (const auto& object : truth["objects"]) {
        overlap += object["files"].size() == 2 ? 1 : 0;
    }
    REQUIRE(overlap > 0);
    REQUIRE(runStarcensus("run mock.fits companion.fits --file-epoch companion.fits=2000 --radius 5,10,30 "
                          "--draws 100 --no-report --no-hosts --checksum none --out merged",
                          dir)
                .exit_code == 0);
    const auto merges = jsonFile(dir / "merged" / "provenance.json")["merges"];
    MESSAGE("companion merge: " << merges.dump() << ", truth overlap " << overlap);
    // Each object of the overlap is one positional merge (less at most 2 true pairs the 3-sigma parallax
    // test refuses: 0.27% of ~60 pairs), nothing by source_id (the companion has none).
    CHECK(merges["by_source_id"] == 0);
    CHECK(merges["by_position"].get<std::int64_t>() <= overlap);
    CHECK(merges["by_position"].get<std::int64_t>() >= overlap - 2);
    CHECK(merges["rows_in"].get<std::int64_t>() - merges["by_position"].get<std::int64_t>() ==
          merges["rows_out"].get<std::int64_t>());
    // T and Y dwarfs are counted within 10 pc.
    const auto fractions = jsonFile(dir / "merged" / "fractions.json");
    for (const auto& radius : fractions["radii"]) {
        if (radius["radius_pc"] != 10.0) {
            continue;
        }
        for (const char* name : {"T", "Y"}) {
            CHECK_MESSAGE(radius["classes"][name]["count"]["this_volume"]["median"].get<double>() > 0.0,
                          name);
        }
    }
}

TEST_CASE("demo: simulates both catalogues and runs the merged census on them") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-demo");
    const auto& dir = scratch.path();
    const Outcome demo = runStarcensus("demo --draws 20 --no-hosts --out demo", dir);
    REQUIRE(demo.exit_code == 0);
    for (const char* name : {"mock.fits", "companion.fits", "truth.json", "fractions.json", "report.html"}) {
        CHECK_MESSAGE(std::filesystem::is_regular_file(dir / "demo" / name), name);
    }
    CHECK(demo.stdout_text.find("truth: all / in either file") != std::string::npos);
    const auto provenance = jsonFile(dir / "demo" / "provenance.json");
    REQUIRE(provenance["inputs"].size() == 2);
    const auto epochs = provenance["settings"]["file_epochs_yr"];
    REQUIRE(epochs.size() == 1);
    CHECK(epochs.begin().value() == 2000.0);
    CHECK(provenance["merges"]["by_position"].get<std::int64_t>() > 100);
    CHECK(provenance["merges"]["by_source_id"] == 0);
}

TEST_CASE("published spectral types: compared with the photometric classes, and used for the class") {
    // CARMENES input catalogue IX (Cifuentes et al., arXiv:2412.12264; tests/reference/): 2634 M dwarfs
    // and their companions, each with a literature spectral type (column SpT, found by name), Gaia DR3
    // astrometry and photometry and 2MASS J/Ks.
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-spectral-types");
    const auto& dir = scratch.path();
    const std::string table =
        std::string(STARCENSUS_SOURCE_DIR) + "/tests/reference/carmenes_ix_photometry.csv";
    const std::string lean =
        " --radius 10,20 --draws 50 --no-report --no-hosts --lf-fit none --checksum none";
    for (const char* policy : {"use", "check", "ignore"}) {
        CAPTURE(policy);
        REQUIRE(runStarcensus(
                    "run '" + table + "'" + lean + " --spectral-types " + policy + " --out " + policy, dir)
                    .exit_code == 0);
    }
    const auto fractions = [&](const char* run) {
        return jsonFile(dir / run / "fractions.json").at("radii").at(1); // 20 pc
    };
    const nlohmann::json checked = fractions("check");
    const nlohmann::json& agreement = checked.at("spectral_type_check");
    CHECK(agreement.at("policy") == "check");
    // Measured on this table: 1062 members with types within 20 pc, 1038 of the same class (0.977), median
    // subtype difference 0.21. The published types are the reference; 95% agreement and half a subtype
    // are the bars (common practice, no source: the usual +-0.5 subtype accuracy of M-dwarf types).
    CHECK(agreement.at("compared").get<int>() >= 1000);
    CHECK(agreement.at("agreement").get<double>() >= 0.95);
    CHECK(agreement.at("median_abs_subtype_difference").get<double>() <= 0.5);
    CHECK(agreement.at("confusion").at("M").at("M").get<int>() >= 950);
    // Under 'check' the rows without usable photometry stay unclassified, by reason, and the shares among
    // the classified members leave them out.
    CHECK(checked.at("unclassified_by_reason").at("no_photometry").at("median").get<double>() >= 1.0);
    CHECK(checked.at("classes")
              .at("M")
              .at("fraction_of_classified")
              .at("this_volume")
              .at("median")
              .get<double>() >
          checked.at("classes").at("M").at("fraction").at("this_volume").at("median").get<double>());
    // Under 'use' every typed member takes its literature class: nothing is unclassified, and the M count
    // is the number of M-typed members (the confusion table's row), within the membership noise.
    const nlohmann::json used = fractions("use");
    CHECK(used.at("classes").at("unclassified").at("count").at("this_volume").at("median").get<double>() ==
          0.0);
    int m_typed = 0;
    for (const auto& [photometric, count] : agreement.at("confusion").at("M").items()) {
        m_typed += count.get<int>();
    }
    CHECK(used.at("classes").at("M").at("count").at("this_volume").at("median").get<double>() ==
          doctest::Approx(m_typed).epsilon(0.03));
    CHECK_FALSE(fractions("ignore").contains("spectral_type_check"));
    // The report shows the agreement; the table has no RA/Dec, which the sky section says (it used to
    // abort in the HEALPix library).
    REQUIRE(runStarcensus("report check", dir).exit_code == 0);
    const std::string report = readFile(dir / "check" / "report.html");
    CHECK(report.find("Photometric classes and literature spectral types") != std::string::npos);
    CHECK(report.find("No member has a position (RA/Dec)") != std::string::npos);
    CHECK(
        runStarcensus("run '" + table + "'" + lean + " --spectral-types maybe --out bad", dir).stderr_text ==
        "starcensus: error: --spectral-types: 'maybe' is not one of use, check, ignore\n");
}

TEST_CASE("published spectral types of ultracool dwarfs: the census's classes from the bands each row has") {
    // Best et al. 2021 (AJ 161, 42) ultracool sheet (tests/reference/), mapped to parallax, G, 2MASS J/H/Ks,
    // WISE W1/W2 with their errors and the near-infrared type spt_ir, compared under --spectral-types
    // check within 25 pc. Most rows have no Gaia photometry: the best match over the bands present
    // (photometry/BandMatch.h). The issue asks for letter agreement >= 0.9 and a median |subtype
    // difference| <= 1.5. Measured: 262 compared, 0.920, median 0.5 (the region cascade before it: 0.897,
    // 0.8).
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-ultracool-types");
    const auto& dir = scratch.path();
    std::filesystem::copy_file(STARCENSUS_SOURCE_DIR "/tests/reference/ultracool_best2021_inspect.csv",
                               dir / "ultracool.csv");
    std::string mapping = " --unit parallax=mas --unit parallax_error=mas";
    for (const char* column :
         {"parallax=plx_formula", "parallax_error=plxerr_formula", "g=G_DR2", "j=J_2MASS",
          "j_error=Jerr_2MASS", "h=H_2MASS", "h_error=Herr_2MASS", "ks=Ks_2MASS", "ks_error=Kserr_2MASS",
          "w1=W1", "w1_error=W1err", "w2=W2", "w2_error=W2err", "spectral_type=spt_ir"}) {
        mapping += std::string(" --column ") + column;
    }
    REQUIRE(
        runStarcensus("run ultracool.csv" + mapping +
                          " --spectral-types check --radius 25 --draws 100 --seed 3 --no-report --no-hosts "
                          "--lf-fit none --checksum none --out check",
                      dir)
            .exit_code == 0);
    const nlohmann::json agreement =
        jsonFile(dir / "check" / "fractions.json").at("radii").at(0).at("spectral_type_check");
    CHECK(agreement.at("compared").get<int>() >= 250);
    CHECK(agreement.at("agreement").get<double>() >= 0.9);
    CHECK(agreement.at("median_abs_subtype_difference").get<double>() <= 1.5);
    CHECK(agreement.at("confusion").at("T").at("T").get<int>() >= 180);
}

TEST_CASE("inspect's printed mapping, fed back as --config, gives the same run as the explicit options") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-inspect");
    const auto& dir = scratch.path();
    // Best et al. 2021 (AJ 161, 42) ultracool dwarfs, columns as published: plx_formula, G_DR2, ...
    std::filesystem::copy_file(STARCENSUS_SOURCE_DIR "/tests/reference/ultracool_best2021_inspect.csv",
                               dir / "ultracool.csv");
    const std::string explicit_mapping =
        "--column parallax=plx_formula --column parallax_error=plxerr_formula "
        "--column g=G_DR2 --unit parallax=mas --unit parallax_error=mas";

    // Without a mapping the required fields are missing: inspect still reads the file (exit 0) and
    // names candidates; a run stops with exit 2 and the one line inspect quotes.
    const Outcome bare = runStarcensus("inspect ultracool.csv", dir);
    CHECK(bare.exit_code == 0);
    CHECK(bare.stdout_text.find("  required fields not mapped yet: parallax parallax_error\n") !=
          std::string::npos);
    const Outcome stopped = runStarcensus("run ultracool.csv --out stopped", dir);
    CHECK(stopped.exit_code == 2);
    CHECK(bare.stdout_text.find("  a run stops with: " + stopped.stderr_text.substr(19)) !=
          std::string::npos);
    CHECK(runStarcensus("inspect missing.csv", dir).exit_code == 2);

    const Outcome inspected = runStarcensus("inspect ultracool.csv " + explicit_mapping, dir);
    REQUIRE(inspected.exit_code == 0);
    const std::vector<std::string> ini =
        blockAfter(inspected.stdout_text, "  mapping as INI lines (--config FILE):");
    const std::vector<std::string> expected_ini = {"column = parallax=plx_formula",
                                                   "column = parallax_error=plxerr_formula",
                                                   "column = g=G_DR2",
                                                   "column = w1=W1",
                                                   "column = w2=W2",
                                                   "column = w1_error=W1err",
                                                   "column = w2_error=W2err",
                                                   "unit = parallax=mas",
                                                   "unit = parallax_error=mas"};
    CHECK(ini == expected_ini);
    {
        std::ofstream config(dir / "mapping.ini");
        for (const auto& line : ini) {
            config << line << "\n";
        }
    }
    const std::string common = " --radius 20 --draws 200 --seed 3 --no-report --no-hosts --lf-fit none "
                               "--checksum none --out ";
    REQUIRE(runStarcensus("run ultracool.csv --config mapping.ini" + common + "from_ini", dir).exit_code ==
            0);
    REQUIRE(runStarcensus("run ultracool.csv " + explicit_mapping + common + "explicit", dir).exit_code == 0);
    const std::vector<std::string> printed =
        blockAfter(inspected.stdout_text, "  mapping as a command line:");
    REQUIRE(printed.size() == 1);
    REQUIRE(printed[0].starts_with("starcensus run ultracool.csv --column parallax=plx_formula "));
    REQUIRE(runStarcensus(printed[0].substr(11) + common + "printed", dir).exit_code == 0);
    for (const char* name : {"fractions.json", "sample.fits", "draws.fits", "lumfunc.csv"}) {
        CAPTURE(name);
        const std::string reference = readFile(dir / "explicit" / name);
        CHECK_FALSE(reference.empty());
        CHECK(readFile(dir / "from_ini" / name) == reference);
        CHECK(readFile(dir / "printed" / name) == reference);
    }

    // A FITS table the rules map by UCD (the simulator's Gaia layout): the printed INI, with its hdu line
    // and every field as --column, gives the run the rules give.
    REQUIRE(runStarcensus("simulate --out mock.fits --truth truth.json --radius-max 12 --seed 5", dir)
                .exit_code == 0);
    const Outcome mock = runStarcensus("inspect mock.fits", dir);
    REQUIRE(mock.exit_code == 0);
    const std::vector<std::string> mock_ini =
        blockAfter(mock.stdout_text, "  mapping as INI lines (--config FILE):");
    REQUIRE(mock_ini.size() > 10);
    CHECK(mock_ini.front() == "hdu = 1");
    CHECK(std::find(mock_ini.begin(), mock_ini.end(), "column = parallax=parallax") != mock_ini.end());
    {
        std::ofstream config(dir / "mock.ini");
        for (const auto& line : mock_ini) {
            config << line << "\n";
        }
    }
    REQUIRE(runStarcensus("run mock.fits --config mock.ini" + common + "mock_ini", dir).exit_code == 0);
    REQUIRE(runStarcensus("run mock.fits" + common + "mock_rules", dir).exit_code == 0);
    for (const char* name : {"fractions.json", "sample.fits", "draws.fits"}) {
        CAPTURE(name);
        CHECK(readFile(dir / "mock_ini" / name) == readFile(dir / "mock_rules" / name));
    }
}

TEST_CASE("ECSV, CSV.gz and VOTable written by astropy give the same run as the FITS file") {
    // astropy's writers (tests/python/write_ecsv.py: ascii.ecsv with the TUCDs as meta.ucd, space- and
    // comma-delimited, gzip and bzip2 copies (the CSV's in two bzip2 streams), ascii.csv, and
    // astropy.io.votable in TABLEDATA, BINARY and BINARY2)
    // from a simulated 12 pc catalogue: every output a run writes from the rows must be byte-identical to
    // the FITS run's (nulls, units and float32 values included).
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-ecsv");
    const auto& dir = scratch.path();
    REQUIRE(runStarcensus("simulate --out mock.fits --truth truth.json --radius-max 12 --seed 3", dir)
                .exit_code == 0);
    REQUIRE(starcensus::testing::runReferencePython("write_ecsv.py", (dir / "mock.fits").string() + " " +
                                                                         dir.string()) == "ok\n");
    const std::string lean =
        " --radius 5,10 --draws 100 --no-report --no-hosts --lf-fit none --checksum none";
    REQUIRE(runStarcensus("run mock.fits" + lean + " --out fits", dir).exit_code == 0);
    // ECSV states its units and UCDs; the plain CSV needs the units of the columns the Gaia names do not fix.
    const std::vector<std::pair<std::string, std::string>> runs = {
        {"table.ecsv", ""},
        {"table.ecsv.gz", ""},
        {"table_comma.ecsv", ""},
        {"table.ecsv.bz2", ""},
        {"table.csv.gz", " --unit pmra=mas/yr --unit pmdec=mas/yr --unit ra=deg --unit dec=deg"},
        {"table.csv.bz2", " --unit pmra=mas/yr --unit pmdec=mas/yr --unit ra=deg --unit dec=deg"},
        {"table_tabledata.vot", ""},
        {"table_binary.vot", ""},
        {"table_binary2.vot", ""},
        {"table_binary2.vot.gz", ""},
        {"table_binary2.vot.bz2", ""}};
    for (const auto& [file, units] : runs) {
        CAPTURE(file);
        const std::string out = "out_" + file;
        REQUIRE(runStarcensus("run " + file + lean + units + " --out " + out, dir).exit_code == 0);
        for (const char* name : {"sample.fits", "fractions.csv", "draws.csv"}) {
            CAPTURE(name);
            CHECK(readFile(dir / out / name) == readFile(dir / "fits" / name));
        }
    }

    // Damaged input: one line naming the file, exit 2, nothing written.
    const std::string ecsv = readFile(dir / "table.ecsv");
    const auto write = [&](const char* name, const std::string& text) {
        std::ofstream(dir / name, std::ios::binary) << text;
    };
    const auto replaced = [&](const std::string& from, const std::string& to) {
        std::string text = ecsv;
        text.replace(text.find(from), from.size(), to);
        return text;
    };
    write("renamed.ecsv", replaced("\nsource_id ra dec", "\nsource ra dec"));
    write("datatype.ecsv", replaced("datatype: float64", "datatype: float80"));
    write("yaml.ecsv", replaced("# datatype:\n", "# datatype: [\n"));
    write("short_row.ecsv", ecsv.substr(0, ecsv.rfind(' ')) + "\n");
    const std::string gz = readFile(dir / "table.ecsv.gz");
    write("truncated.ecsv.gz", gz.substr(0, gz.size() / 2));
    const std::string bz = readFile(dir / "table.ecsv.bz2");
    write("truncated.ecsv.bz2", bz.substr(0, bz.size() / 2));
    write("trailing.ecsv.bz2", bz + "not bzip2");
    const std::string tabledata = readFile(dir / "table_tabledata.vot");
    // Pieces joined rather than edited in place (GCC 12 warns, wrongly, on std::string::replace here).
    const auto spliced = [](const std::string& text, std::size_t at, std::size_t removed,
                            const char* inserted) {
        return text.substr(0, at) + inserted + text.substr(at + removed);
    };
    const std::size_t first_cell = tabledata.find("<TD>");
    write("short_row.vot", spliced(tabledata, first_cell, tabledata.find("</TD>") + 5 - first_cell, ""));
    write("datatype.vot", spliced(tabledata, tabledata.find("datatype=\"double\""), 17, "datatype=\"quad\""));
    write("truncated.vot", tabledata.substr(0, tabledata.size() / 2));
    const std::string binary2 = readFile(dir / "table_binary2.vot");
    write("base64.vot", spliced(binary2, binary2.find("<STREAM encoding=\"base64\">") + 26, 0, "!"));
    const std::vector<std::pair<std::string, std::string>> bad = {
        {"renamed.ecsv", "the header row's column names are not those the ECSV header declares"},
        {"datatype.ecsv", "ECSV column ra has datatype 'float80', not one of ECSV 1.0's"},
        {"yaml.ecsv", "ECSV header is not valid YAML"},
        {"short_row.ecsv", "fields, the header has 20"},
        {"truncated.ecsv.gz", "damaged or truncated compressed data after line"},
        {"truncated.ecsv.bz2", "(bzip2: the data end inside a stream)"},
        {"trailing.ecsv.bz2", "(bzip2: not bzip2 data after the end of stream 1)"},
        {"short_row.vot", "VOTable row 1 has 19 cells, the table 20 FIELDs"},
        {"datatype.vot", "has datatype 'quad', not one of VOTable 1.4's"},
        {"truncated.vot", "not a well-formed VOTable"},
        {"base64.vot", "VOTable binary stream has a character that is not base64 ('!')"}};
    for (const auto& [file, message] : bad) {
        CAPTURE(file);
        const Outcome outcome = runStarcensus("run " + file + lean + " --out bad_" + file, dir);
        CHECK(outcome.exit_code == 2);
        CHECK(lineCount(outcome.stderr_text) == 1);
        CHECK(outcome.stderr_text.find(file) != std::string::npos);
        CHECK(outcome.stderr_text.find(message) != std::string::npos);
        CHECK_FALSE(directoryHasFiles(dir / ("bad_" + file)));
    }
}

TEST_CASE("a table without Gaia G runs: the Kirkpatrick et al. 2019 Y dwarfs from MKO J and WISE") {
    // The 23 Y dwarfs (Kirkpatrick et al. 2019, ApJS 240, 19; tests/reference/), '-' for not measured, a
    // text column "source" that the name rule would take for source_id (left unmapped with none).
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-y-dwarfs");
    const auto& dir = scratch.path();
    const std::string table =
        std::string(STARCENSUS_SOURCE_DIR) + "/tests/reference/y_dwarfs_kirkpatrick2019_photometry.csv";
    const std::string mapping =
        " --column source_id=none --column parallax=plx_mas --column parallax_error=plx_err "
        "--column j=J_MKO --column w1=W1_mag --column w2=W2_mag --column spectral_type=SpT "
        "--unit parallax=mas --unit parallax_error=mas";
    REQUIRE(runStarcensus("run '" + table + "'" + mapping +
                              " --radius 20 --draws 100 --spectral-types check --checksum none --out y",
                          dir)
                .exit_code == 0);
    const auto radius = jsonFile(dir / "y" / "fractions.json").at("radii").at(0);
    // Measured: 17 of the 23 photometrically Y (the classifier test's figure), 5 T (Y0 dwarfs on the T9.5V
    // side of the locus), 1 without a class; median subtype difference 0.25.
    const auto& check = radius.at("spectral_type_check");
    CHECK(check.at("compared") == 23);
    CHECK(check.at("confusion").at("Y").at("Y").get<int>() >= 17);
    CHECK(check.at("median_abs_subtype_difference").get<double>() <= 0.5);
    CHECK(radius.at("classes").at("Y").at("count").at("this_volume").at("median").get<double>() >= 17.0);
    CHECK(std::filesystem::is_regular_file(dir / "y" / "report.html"));

    // sample.fits read back with astropy (python3-astropy): every row classified by the best match over
    // J, W1, W2 (flag 1024) carries its chi^2 and the Delta chi^2 = 1 interval of the code, tagged with
    // the IVOA UCDs stat.fit.chi2, stat.min, stat.max. The interval is about the unrounded minimum and
    // spectral_code is that minimum to the nearest half subtype, so the code may lie 0.25 outside it.
    const auto sample = nlohmann::json::parse(
        starcensus::testing::runReferencePython("dump_fits_table.py", (dir / "y" / "sample.fits").string()));
    std::map<std::string, nlohmann::json> columns;
    for (const auto& column : sample.at("columns")) {
        columns[column.at("name").get<std::string>()] = column;
    }
    CHECK(columns.at("match_chi2").at("ucd") == "stat.fit.chi2");
    CHECK(columns.at("spectral_code_low").at("ucd") == "src.spType;stat.min");
    std::size_t matched = 0;
    for (std::size_t row = 0; row < columns.at("flags").at("values").size(); ++row) {
        if ((columns.at("flags").at("values").at(row).get<int>() & 1024) == 0) {
            continue;
        }
        ++matched;
        const double chi2 = columns.at("match_chi2").at("values").at(row).get<double>();
        const double code = columns.at("spectral_code").at("values").at(row).get<double>();
        const double low = columns.at("spectral_code_low").at("values").at(row).get<double>();
        const double high = columns.at("spectral_code_high").at("values").at(row).get<double>();
        CHECK(chi2 >= 0.0);
        CHECK(low - 0.25 <= code);
        CHECK(code <= high + 0.25);
        CHECK(high - low < 3.0); // J, W1 and W2 pin a Y dwarf's type within a few subtypes
    }
    CHECK(matched >= 20); // of the 23; the rest lack W1 or J
}

namespace {

/// Every regular file under `directory` (relative path -> bytes).
std::map<std::string, std::string> filesUnder(const std::filesystem::path& directory) {
    std::map<std::string, std::string> files;
    for (const auto& entry : std::filesystem::recursive_directory_iterator(directory)) {
        if (entry.is_regular_file()) {
            std::ifstream stream(entry.path(), std::ios::binary);
            files[std::filesystem::relative(entry.path(), directory).string()] = {
                (std::istreambuf_iterator<char>(stream)), std::istreambuf_iterator<char>()};
        }
    }
    return files;
}

/// provenance.json without the fields that differ between runs by design: when it was written, how long
/// each stage took, and the command's options as given (--threads, --out).
std::string provenanceWithoutRunFields(const std::string& text) {
    auto provenance = nlohmann::json::parse(text);
    provenance.erase("created_utc");
    provenance.erase("timings_s");
    provenance.erase("command_options");
    return provenance.dump(1);
}

/// `text` with whatever lies between each `opening` and the next `closing` after it removed.
std::string withoutBetween(std::string text, const std::string& opening, const std::string& closing) {
    for (auto at = text.find(opening); at != std::string::npos;
         at = text.find(opening, at + opening.size())) {
        const auto begin = at + opening.size();
        const auto end = text.find(closing, begin);
        text.erase(begin, end == std::string::npos ? std::string::npos : end - begin);
    }
    return text;
}

/// An output with the fields that differ between runs by design masked: provenance.json's (and
/// report.html's table of it) creation time, stage timings and options as given (--threads, --seed, --out),
/// and the creation date cairo writes into every PDF figure.
std::string withoutRunFields(const std::string& name, const std::string& bytes) {
    if (name == "provenance.json") {
        return provenanceWithoutRunFields(bytes);
    }
    if (name.ends_with(".pdf")) {
        return withoutBetween(bytes, "/CreationDate (", ")");
    }
    if (name.ends_with(".html")) {
        std::string text = bytes;
        for (const char* field : {"created_utc", "timings_s", "command_options"}) {
            text = withoutBetween(text, std::string("<tr><td><code>") + field + "</code></td>", "</tr>");
        }
        return text;
    }
    return bytes;
}

/// Starts the executable in `directory` (stdout and stderr to /dev/null); returns its process id.
pid_t startStarcensus(const std::vector<std::string>& arguments, const std::filesystem::path& directory) {
    std::vector<std::string> argv_text = {STARCENSUS_EXECUTABLE};
    argv_text.insert(argv_text.end(), arguments.begin(), arguments.end());
    std::vector<char*> argv;
    for (auto& argument : argv_text) {
        argv.push_back(argument.data());
    }
    argv.push_back(nullptr);
    const pid_t child = ::fork();
    if (child == 0) {
        const int null_device = ::open("/dev/null", O_WRONLY);
        if (::chdir(directory.c_str()) != 0 || null_device < 0) {
            ::_exit(127);
        }
        ::dup2(null_device, STDOUT_FILENO);
        ::dup2(null_device, STDERR_FILENO);
        ::execv(argv[0], argv.data());
        ::_exit(127);
    }
    return child;
}

} // namespace

TEST_CASE("determinism: every output byte for byte the same with 1, 2 and 4 threads and when repeated") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-threads");
    const auto& dir = scratch.path();
    REQUIRE(runStarcensus("simulate --out mock.fits --truth truth.json --radius-max 12 --seed 5", dir)
                .exit_code == 0);
    // Each run writes to "out" (paths in the outputs are then the same) and is moved aside afterwards.
    std::vector<std::map<std::string, std::string>> runs;
    for (const char* threads : {"1", "2", "4", "4"}) {
        REQUIRE(runStarcensus(
                    std::string("run mock.fits --radius 5,10 --draws 100 --seed 9 --out out --threads ") +
                        threads,
                    dir)
                    .exit_code == 0);
        runs.push_back(filesUnder(dir / "out"));
        std::filesystem::remove_all(dir / "out");
    }
    const auto& reference = runs.front();
    REQUIRE(reference.count("provenance.json") == 1);
    CHECK(reference.count("report.html") == 1);
    CHECK(reference.size() > 10);
    for (std::size_t run = 1; run < runs.size(); ++run) {
        CAPTURE(run);
        REQUIRE(runs[run].size() == reference.size());
        for (const auto& [name, bytes] : reference) {
            CAPTURE(name);
            REQUIRE(runs[run].count(name) == 1);
            CHECK(withoutRunFields(name, runs[run].at(name)) == withoutRunFields(name, bytes));
        }
    }
}

TEST_CASE("interruption: SIGINT, SIGTERM or SIGKILL at any point leaves only complete files under their "
          "final names, and the previous run's outputs intact") {
    const starcensus::testing::ScratchDirectory scratch("starcensus-cli-interrupt");
    const auto& dir = scratch.path();
    REQUIRE(runStarcensus("simulate --out mock.fits --truth truth.json --radius-max 12 --seed 5", dir)
                .exit_code == 0);
    const std::string options = "run mock.fits --radius 5,10 --draws 100 --out out --seed ";
    // The complete outputs of both seeds, each made in "out" (paths inside are then the same).
    REQUIRE(runStarcensus(options + "2", dir).exit_code == 0);
    const auto second = filesUnder(dir / "out");
    std::filesystem::remove_all(dir / "out");
    REQUIRE(runStarcensus(options + "1", dir).exit_code == 0);
    const auto first = filesUnder(dir / "out");
    REQUIRE(first.size() == second.size());
    CHECK(first.at("fractions.json") != second.at("fractions.json"));

    // A run with seed 2 over the seed-1 outputs, stopped at points from the start to past the end of the
    // scan, the draws and the outputs (a complete run here takes ~0.3-1 s, longer under sanitizers).
    int interrupted = 0;
    for (const int signal : {SIGINT, SIGTERM, SIGKILL}) {
        for (const int delay_ms : {5, 60, 150, 300, 600}) {
            CAPTURE(signal);
            CAPTURE(delay_ms);
            const pid_t child = startStarcensus(
                {"run", "mock.fits", "--radius", "5,10", "--draws", "100", "--out", "out", "--seed", "2"},
                dir);
            REQUIRE(child > 0);
            ::usleep(static_cast<useconds_t>(delay_ms) * 1000);
            ::kill(child, signal);
            int status = 0;
            REQUIRE(::waitpid(child, &status, 0) == child);
            interrupted += WIFSIGNALED(status) ? 1 : 0;
            const auto now = filesUnder(dir / "out");
            for (const auto& [name, bytes] : first) {
                CAPTURE(name);
                REQUIRE(now.count(name) == 1); // nothing of the previous run lost
                const std::string found = withoutRunFields(name, now.at(name));
                const bool previous = found == withoutRunFields(name, bytes);
                const bool complete_new = found == withoutRunFields(name, second.at(name));
                CHECK((previous || complete_new));
            }
            for (const auto& [name, bytes] : now) {
                // Only temporaries (".partial-", left by a signal that ends the process) are extra.
                CHECK((first.count(name) == 1 || name.find(".partial-") != std::string::npos));
            }
        }
    }
    MESSAGE(interrupted << " of 15 runs ended by the signal before they finished");
    CHECK(interrupted >= 6);
}
