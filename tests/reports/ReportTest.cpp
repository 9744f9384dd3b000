#include "reports/Report.h"
#include "photometry/base/InputError.h"
#include "tests/reports/ReportFixture.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <cmath>
#include <fstream>
#include <numbers>
#include <random>
#include <sstream>

using namespace starcensus;
using namespace starcensus::reports;

namespace {

std::string readFile(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    std::ostringstream text;
    text << file.rdbuf();
    return text.str();
}

void writeFile(const std::filesystem::path& path, const std::string& text) {
    std::ofstream(path, std::ios::binary) << text;
}

std::vector<std::string> idsOf(const std::vector<FigureOutput>& figures) {
    std::vector<std::string> ids;
    for (const auto& figure : figures) {
        ids.push_back(figure.id);
    }
    return ids;
}

/// The files another part of starcensus writes, in the formats of README.md, with made-up numbers.
void writeOptionalInputs(const std::filesystem::path& directory) {
    writeFile(directory / "lumfunc.csv",
              "population,abs_g_lo,abs_g_hi,n_weighted,phi_per_pc3_per_mag,phi_lo68,phi_hi68,"
              "model_phi_per_pc3_per_mag\n"
              "main_sequence,4,6,10,0.0012,0.0009,0.0016,0.0011\n"
              "main_sequence,6,8,25,0.0030,0.0025,0.0036,0.0031\n"
              "main_sequence,8,10,60,0.0071,0.0063,0.0080,0.0069\n"
              "main_sequence,10,12,120,0.0140,0.0128,0.0153,\n"
              "white_dwarf,10,12,5,0.0006,0.0004,0.0009,\n"
              "white_dwarf,12,14,12,0.0014,0.0010,0.0018,\n");
    writeFile(directory / "lumfunc_fit.json", R"({"schema": "starcensus.lumfunc_fit/1", "fits": [
        {"model": "kroupa2001", "converged": true, "iterations": 12, "message": "ok",
         "parameters": {"alpha1": 1.31}, "errors": {"alpha1": 0.07}, "covariance": [[0.0049]],
         "log_likelihood": -42.5, "goodness_of_fit": {"chi2": 3.1, "dof": 2}}],
        "complete_abs_g_range": [4.0, 12.0]})");
    writeFile(directory / "completeness.json",
              R"({"schema": "starcensus.completeness/1", "faint_limit_g": 19.5,
        "bright_limit_g": 3.0, "faint_limit_source": "estimated", "radii": [{"radius_pc": 10,
        "complete_abs_g_range": [3.0, 19.5], "classes": {"M": {"v_over_vmax": 0.49, "v_over_vmax_expected": 0.5,
        "v_over_vmax_sigma": 0.02, "completeness_radius_pc": 10, "complete": true}}}]})");
    writeFile(directory / "provenance.json",
              R"({"version": "0.1.0", "seed": 3, "inputs": [{"path": "mock.fits",
        "sha256": "0123abcd"}]})");
}

/// `stars` invented members (demo data, for the figures' size only): 97% along a main-sequence-like band,
/// 3% along a white-dwarf-like one, uniform on the sky and in the volume of the demo run's radii.
SampleColumns syntheticSample(const std::vector<double>& radii_pc, std::size_t stars) {
    std::mt19937_64 generator(7);
    std::uniform_real_distribution<double> unit(0.0, 1.0);
    std::normal_distribution<double> scatter(0.0, 0.3);
    SampleColumns sample;
    sample.radii_pc = radii_pc;
    for (std::size_t i = 0; i < stars; ++i) {
        const bool white_dwarf = unit(generator) < 0.03;
        const double colour = white_dwarf ? -0.3 + 1.5 * unit(generator) : 0.5 + 4.0 * unit(generator);
        sample.bp_rp_mag.push_back(colour);
        sample.abs_g_mag.push_back((white_dwarf ? 11.0 + 3.0 * colour : 2.0 + 2.5 * colour) +
                                   scatter(generator));
        sample.class_name.emplace_back(white_dwarf ? "WD" : "M");
        sample.ra_deg.push_back(360.0 * unit(generator));
        sample.dec_deg.push_back(std::asin(2.0 * unit(generator) - 1.0) * 180.0 / std::numbers::pi);
        sample.parallax_mas.push_back(1000.0 / (radii_pc.back() * std::cbrt(unit(generator))));
    }
    sample.p_within.assign(radii_pc.size(), std::vector<double>(stars, 1.0));
    return sample;
}

} // namespace

TEST_CASE("fractions.json records each quality cut and what it did") {
    const auto fractions = nlohmann::json::parse(readFile(testing::demoRunDirectory() / "fractions.json"));
    const auto& provenance = fractions.at("provenance");
    REQUIRE(provenance.contains("quality_cuts"));
    REQUIRE(provenance.at("quality_cuts").size() >= 1);
    for (const auto& cut : provenance.at("quality_cuts")) {
        CHECK_FALSE(cut.at("name").get<std::string>().empty());
        CHECK_FALSE(cut.at("description").get<std::string>().empty());
        CHECK(cut.at("rows_affected").get<std::int64_t>() >= 0);
    }
    CHECK(provenance.at("candidates_after_cuts").get<std::int64_t>() <=
          provenance.at("candidates_before_cuts").get<std::int64_t>());
    // One mock file: nothing to merge, and the cuts see every candidate.
    const auto& merges = provenance.at("merges");
    CHECK(merges.at("rows_in") == merges.at("rows_out"));
    CHECK(merges.at("rows_out") == provenance.at("candidates_before_cuts"));
    CHECK(merges.at("file_pairs").empty());
}

TEST_CASE("the report of a demo run: every figure as SVG, PDF and PNG, and one self-contained HTML file") {
    const testing::ScratchDirectory scratch("starcensus-report-basic");
    const auto directory = testing::copyOfDemoRun(scratch, "run");
    const auto report = writeCensusReport(directory);

    // Without lumfunc.csv the luminosity function is left out, with a note; the rest is always drawn.
    const std::vector<std::string> expected = {
        "cmd", "cumulative_counts", "fractions_by_class", "fractions_vs_radius", "sky_map", "multiplicity"};
    CHECK(idsOf(report.figures) == expected);
    CHECK(report.notes.size() == 4); // lumfunc.csv, lumfunc_fit.json, completeness.json, provenance.json
    const std::string html = readFile(report.html);
    for (const auto& figure : report.figures) {
        CAPTURE(figure.id);
        CHECK(html.find("<figure id=\"fig-" + figure.id + "\"") != std::string::npos);
        CHECK(readFile(figure.svg).find("<svg") != std::string::npos);
        CHECK(readFile(figure.pdf).rfind("%PDF-", 0) == 0);
        // Each PNG drawn by PLplot has ink: axes, labels and data cover well over 1% of the page.
        const auto image = testing::readPng(figure.png);
        CHECK(image.width >= 600);
        CHECK(image.inkFraction(0, 0, image.width, image.height) > 0.02);
    }
    CHECK(html.find("lumfunc.csv is absent") != std::string::npos);
    // Self-contained: nothing to fetch, nothing to run.
    CHECK(html.find("<script") == std::string::npos);
    CHECK(html.find("<link") == std::string::npos);
    CHECK(html.find("src=\"http") == std::string::npos);
    CHECK(html.find("url(") == std::string::npos);
    // Tables: fractions per radius, quality cuts with counts, provenance, sky uniformity.
    CHECK(html.find("<h3>Within 10 pc</h3>") != std::string::npos);
    CHECK(html.find("<h2>Quality cuts</h2>\n<p>") != std::string::npos);
    CHECK(html.find("<h2>Inputs: merged rows</h2>\n<p>") != std::string::npos);
    CHECK(
        html.find(
            " objects after merging: 0 rows repeated a source_id, 0 matched by position (within 2 arcsec at "
            "J2016)") != std::string::npos);
    CHECK(html.find("Sky uniformity") != std::string::npos);
    CHECK(html.find("<code>seed</code>") != std::string::npos);
    // A few thousand stars keep one marker each: no density form, no image in the diagram's SVG.
    const auto analysis = analyseReport(readReportInputs(directory), {});
    CHECK_FALSE(analysis.cmd_density_form);
    CHECK_FALSE(analysis.sky_density_form);
    CHECK(readFile(directory / "figures" / "cmd.svg").find("<image") == std::string::npos);
    CHECK(html.find("too many for one marker each") == std::string::npos);
    // The mock is isotropic (census/mock/Neighbourhood.h: Poisson positions in a sphere).
    CHECK_FALSE(report.uniformity.uniformity_rejected);
    CHECK(report.uniformity.objects > 100);
}

TEST_CASE("a figure file the drawing process cannot write fails the report with its name, in one line") {
    // The PNGs are drawn by a child process (Figures.cpp); its error must reach the caller. A directory
    // in the PNG's place makes the child's rename onto it fail.
    const testing::ScratchDirectory scratch("starcensus-report-child-error");
    const auto directory = testing::copyOfDemoRun(scratch, "run");
    std::filesystem::create_directories(directory / "figures" / "cmd.png" / "occupied");
    std::string message;
    try {
        writeCensusReport(directory);
    } catch (const InputError& error) {
        message = error.what();
    }
    CHECK(message.find("cmd.png") != std::string::npos);
    CHECK(message.find('\n') == std::string::npos);
    CHECK_FALSE(std::filesystem::exists(directory / "report.html"));
    // Nothing half-written: no temporary files left beside the figures.
    for (const auto& entry : std::filesystem::directory_iterator(directory / "figures")) {
        CAPTURE(entry.path());
        CHECK(entry.path().filename().string().find(".partial-") == std::string::npos);
    }
}

TEST_CASE("the report uses lumfunc.csv, lumfunc_fit.json, completeness.json and provenance.json") {
    const testing::ScratchDirectory scratch("starcensus-report-full");
    const auto directory = testing::copyOfDemoRun(scratch, "run");
    writeOptionalInputs(directory);
    const auto report = writeCensusReport(directory);
    const std::vector<std::string> expected = {
        "cmd",     "luminosity_function", "cumulative_counts", "fractions_by_class", "fractions_vs_radius",
        "sky_map", "multiplicity"};
    CHECK(idsOf(report.figures) == expected);
    CHECK(idsOf(report.figures) == reportFigureIds());
    CHECK(report.notes.empty());
    const std::string html = readFile(report.html);
    // The faint limit of completeness.json: M_G = 19.5 - 5 log10(10 / 10) = 19.5 at the largest radius.
    CHECK(html.find("G = 19.5 at 10 pc (M_G = 19.5; source: completeness.json (estimated))") !=
          std::string::npos);
    CHECK(html.find("alpha1 = 1.31 ± 0.07") != std::string::npos);
    CHECK(html.find("the complete M_G range of the fit (4 to 12 mag)") != std::string::npos);
    CHECK(html.find("<h3>provenance.json</h3>") != std::string::npos);
    CHECK(html.find("0123abcd") != std::string::npos);
}

TEST_CASE("report inputs: lumfunc.csv parsing and bad input named in one line") {
    const auto bins = parseLuminosityFunctionCsv("population,abs_g_lo,abs_g_hi,n_weighted,phi_per_pc3_per_"
                                                 "mag,phi_lo68,phi_hi68,model_phi_per_pc3_per_mag\n"
                                                 "evolved,0,2,3,1e-4,5e-5,2e-4,\n",
                                                 "lumfunc.csv");
    REQUIRE(bins.size() == 1);
    CHECK(bins[0].population == "evolved");
    CHECK(bins[0].abs_g_hi == 2.0);
    CHECK(bins[0].phi_per_pc3_per_mag == doctest::Approx(1e-4));
    CHECK(std::isnan(bins[0].model_phi_per_pc3_per_mag));
    CHECK_THROWS_WITH_AS(parseLuminosityFunctionCsv("population,abs_g_lo\n", "x/lumfunc.csv"),
                         "x/lumfunc.csv: no column abs_g_hi", InputError);
    CHECK_THROWS_WITH_AS(parseLuminosityFunctionCsv(
                             "population,abs_g_lo,abs_g_hi,n_weighted,phi_per_pc3_per_mag,phi_lo68,phi_hi68,"
                             "model_phi_per_pc3_per_mag\nmain_sequence,4,six,1,1,1,1,1\n",
                             "lumfunc.csv"),
                         "lumfunc.csv: line 2, column abs_g_hi: not a number: six", InputError);

    const testing::ScratchDirectory scratch("starcensus-report-bad");
    CHECK_THROWS_WITH_AS(readReportInputs(scratch.path()), doctest::Contains("sample.fits: no such file"),
                         InputError);
    const auto directory = testing::copyOfDemoRun(scratch, "run");
    writeFile(directory / "sample.fits", "not a FITS file");
    CHECK_THROWS_WITH_AS(readReportInputs(directory),
                         doctest::Contains("sample.fits: cannot open the sample table"), InputError);
    const auto other = testing::copyOfDemoRun(scratch, "other");
    writeFile(other / "completeness.json", "{ not json");
    CHECK_THROWS_WITH_AS(readReportInputs(other), doctest::Contains("completeness.json: not valid JSON"),
                         InputError);
    std::filesystem::remove(other / "completeness.json");
    std::filesystem::remove(other / "fractions.json");
    CHECK_THROWS_WITH_AS(readReportInputs(other), doctest::Contains("fractions.json: no such file"),
                         InputError);
}

TEST_CASE("base64 and HTML escaping") {
    // RFC 4648 Sect. 10 test vectors.
    CHECK(base64Encode("") == "");
    CHECK(base64Encode("f") == "Zg==");
    CHECK(base64Encode("fo") == "Zm8=");
    CHECK(base64Encode("foo") == "Zm9v");
    CHECK(base64Encode("foobar") == "Zm9vYmFy");
    CHECK(escapeHtml("a<b & \"c\">") == "a&lt;b &amp; &quot;c&quot;&gt;");
}

TEST_CASE("10^5 stars: the colour-magnitude diagram and the sky take their density forms, files stay small") {
    const testing::ScratchDirectory scratch("starcensus-report-dense");
    auto inputs = readReportInputs(testing::demoRunDirectory());
    constexpr std::size_t kStars = 100000;
    inputs.sample = syntheticSample(inputs.sample.radii_pc, kStars);
    const auto analysis = analyseReport(inputs, {});
    REQUIRE(analysis.members.size() == kStars);
    CHECK(analysis.cmd_density_form);
    CHECK(analysis.sky_density_form);
    // Every star with both values is in one cell of the diagram's histogram (the axes take them all in).
    CHECK(analysis.cmd_rows.size() == kStars);
    CHECK(analysis.cmd_grid.total() == static_cast<std::int64_t>(kStars));
    std::int64_t mapped = 0;
    for (const auto count : analysis.sky_map_counts.counts) {
        mapped += count;
    }
    CHECK(mapped == static_cast<std::int64_t>(kStars));
    // The sky map's nside: the finest up to 64 with a mean of at least 10 per pixel, 10^5 / (12 * 32^2) =
    // 8.1 at 32, so 16.
    CHECK(analysis.sky_map_counts.nside == 16);

    const auto figures = drawReportFigures(inputs, analysis, scratch.path() / "figures", nullptr);
    for (const auto& figure : figures) {
        CAPTURE(figure.id);
        // Before the density forms the diagram's SVG held one element per star: 32 MB for 268,009
        // candidates. Now every SVG holds the shaded cells as one image: bounded whatever the count.
        CHECK(std::filesystem::file_size(figure.svg) < 1000000);
        CHECK(std::filesystem::file_size(figure.pdf) < 1000000);
        if (figure.id == "cmd" || figure.id == "sky_map") {
            CHECK(readFile(figure.svg).find("<image") != std::string::npos);
        }
    }
    const std::string html = reportHtml(inputs, analysis, figures);
    CHECK(html.size() < 10000000); // the issue's bound on report.html
    CHECK(html.find("too many for one marker each") != std::string::npos);
    CHECK(html.find("src=\"data:image/svg+xml;base64,") != std::string::npos);
    CHECK(html.find("src=\"data:image/png;base64,") == std::string::npos);

    // A figure whose SVG is over 1 MiB (here a stand-in of 2 MB) is inlined as its PNG instead.
    auto large = figures;
    large.back().svg = scratch.path() / "large.svg";
    writeFile(large.back().svg, "<svg>" + std::string(2000000, ' ') + "</svg>");
    const std::string with_png = reportHtml(inputs, analysis, large);
    const auto sky = with_png.find("<figure id=\"fig-sky_map\"");
    REQUIRE(sky != std::string::npos);
    CHECK(with_png.find("src=\"data:image/png;base64," + base64Encode(readFile(large.back().png)) + "\"",
                        sky) != std::string::npos);
    CHECK(with_png.size() < 10000000);
}
