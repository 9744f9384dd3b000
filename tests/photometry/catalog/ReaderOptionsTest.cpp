#include "FitsFixture.h"

#include "photometry/base/InputPaths.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/ReaderOptions.h"

#include <doctest/doctest.h>

#include <filesystem>

using namespace starcensus::photometry;
using namespace starcensus::testing;
namespace po = boost::program_options;

namespace {

ScanSettings parse(std::vector<std::string> arguments) {
    arguments.insert(arguments.begin(), "starcensus");
    std::vector<const char*> argv;
    for (const auto& argument : arguments) {
        argv.push_back(argument.c_str());
    }
    po::variables_map options;
    po::store(po::parse_command_line(static_cast<int>(argv.size()), argv.data(), catalogReaderOptions()),
              options);
    po::notify(options);
    return scanSettingsFromOptions(options);
}

std::string parseError(const std::vector<std::string>& arguments) {
    return inputErrorOf([&] { parse(arguments); });
}

std::string expandError(const std::vector<std::string>& arguments) {
    return inputErrorOf([&] { starcensus::expandInputPaths(arguments); });
}

} // namespace

TEST_CASE("reader options have documented defaults and parse NAME=VALUE pairs") {
    const ScanSettings defaults = parse({});
    CHECK(defaults.candidate_sigma == 3.0);
    CHECK(defaults.threads == 0);
    CHECK(defaults.block_bytes == std::size_t{8} << 20);
    CHECK(defaults.hdu.empty());
    CHECK(defaults.user_columns.empty());

    const ScanSettings given =
        parse({"--column", "Parallax=PLX", "--column", "g=PHOT_G", "--unit", "parallax=uas", "--hdu", "GAIA",
               "--candidate-sigma", "2.5", "--threads", "2", "--read-block-mb", "1"});
    CHECK(given.user_columns.at("parallax") == "PLX");
    CHECK(given.user_columns.at("g") == "PHOT_G");
    CHECK(given.user_units.at("parallax") == "uas");
    CHECK(given.hdu == "GAIA");
    CHECK(given.candidate_sigma == 2.5);
    CHECK(given.threads == 2);
    CHECK(given.block_bytes == std::size_t{1} << 20);

    std::ostringstream help;
    help << catalogReaderOptions();
    CHECK(help.str().find("--candidate-sigma K (=3)") != std::string::npos);
    CHECK(help.str().find("parallax_error pmra") != std::string::npos);
}

TEST_CASE("bad reader option values are rejected with the value and the allowed range") {
    CHECK(parseError({"--candidate-sigma", "12"}) ==
          "option --candidate-sigma 12: outside the allowed range 0 to 10");
    CHECK(parseError({"--threads", "-1"}) == "option --threads -1: outside the allowed range 0 to 1024");
    CHECK(parseError({"--read-block-mb", "0"}) ==
          "option --read-block-mb 0: outside the allowed range 1 to 1024");
    CHECK(parseError({"--column", "parallax"}) ==
          "option --column 'parallax': expected NAME=COLUMN with NAME one of: source_id ra dec parallax "
          "parallax_error pmra pmdec g bp rp g_error bp_error rp_error j h ks ruwe j_error h_error ks_error "
          "b v "
          "w1 w2 b_error v_error w1_error w2_error components spectral_type");
    CHECK(parseError({"--column", "plx=PLX"})
              .starts_with("option --column 'plx=PLX': unknown field 'plx' (fields: "));
    CHECK(parseError({"--column", "g=A", "--column", "G=B"}) ==
          "option --column 'G=B': field g is given twice");
    CHECK(
        parseError({"--unit", "parallax=deg"}) ==
        "option --unit 'parallax=deg': unit 'deg' is not accepted for parallax (accepted: mas, milliarcsec, "
        "marcsec, arcsec, arcsecond, uas, \xC2\xB5"
        "as, microarcsec, \xCE\xBC"
        "as)");
}

TEST_CASE("input paths expand globs and @lists, and name what is missing") {
    const ScratchDirectory directory("starcensus-reader");
    auto listOf = [](const std::string& path) { return std::string("@").append(path); };
    for (const auto* name : {"b.fits", "a.fits", "c.csv"}) {
        writeText(directory.file(name), "");
    }
    const std::filesystem::path folder = std::filesystem::path(directory.file("a.fits")).parent_path();
    CHECK(starcensus::expandInputPaths({directory.file("*.fits")}) ==
          std::vector<std::string>{directory.file("a.fits"), directory.file("b.fits")});
    writeText(directory.file("list.txt"),
              "# inputs\n\nc.csv\n  " + directory.file("b.fits") + "  \n*.fits\n");
    // b.fits (listed, then matched by the pattern) and c.csv (listed, then given) are kept once, where
    // they first appear, each repeat with one warning (issue 15).
    std::vector<std::string> warnings;
    CHECK(starcensus::expandInputPaths({listOf(directory.file("list.txt")), directory.file("c.csv")},
                                       &warnings) == std::vector<std::string>{(folder / "c.csv").string(),
                                                                              directory.file("b.fits"),
                                                                              (folder / "a.fits").string()});
    CHECK(warnings ==
          std::vector<std::string>{(folder / "b.fits").string() + ": the same file as " +
                                       directory.file("b.fits") + ", given earlier; read once",
                                   directory.file("c.csv") + ": the same file as " +
                                       (folder / "c.csv").string() + ", given earlier; read once"});
    // Through a symbolic link and a "./" detour it is still the same file.
    std::filesystem::create_symlink(directory.file("a.fits"), directory.file("link.fits"));
    CHECK(starcensus::expandInputPaths(
              {directory.file("a.fits"), directory.file("link.fits"), (folder / "." / "a.fits").string()}) ==
          std::vector<std::string>{directory.file("a.fits")});
    CHECK(expandError({directory.file("none.fits")}) == directory.file("none.fits") + ": no such file");
    CHECK(expandError({directory.file("*.fz")}) == directory.file("*.fz") + ": no file matches this pattern");
    CHECK(expandError({listOf(directory.file("nolist.txt"))}) ==
          directory.file("nolist.txt") + ": cannot read this list of input files");
    writeText(directory.file("bad.txt"), "a.fits\nmissing.fits\n");
    CHECK(expandError({listOf(directory.file("bad.txt"))}) == (folder / "missing.fits").string() +
                                                                  ": no such file (listed in " +
                                                                  directory.file("bad.txt") + " line 2)");
}
