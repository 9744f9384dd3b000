// Opens report.html in headless Chromium (Debian package chromium) and checks from screenshots that
// every figure rendered: the expected number of figures, none blank.
#include "reports/Report.h"
#include "tests/reports/ReportFixture.h"

#include <doctest/doctest.h>

#include <cstdlib>
#include <fstream>
#include <sstream>

using namespace starcensus;

namespace {

constexpr const char* kChromium = "/usr/bin/chromium";

std::string readFile(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    std::ostringstream text;
    text << file.rdbuf();
    return text.str();
}

/// Runs headless Chromium on a local file with a fresh profile; `action` is --screenshot=... or
/// --dump-dom. Returns the exit status; output goes to `log`.
int runChromium(const testing::ScratchDirectory& scratch, const std::filesystem::path& page,
                const std::string& action, const std::string& window, const std::filesystem::path& log) {
    static int profiles = 0;
    const auto profile = scratch.path() / ("profile-" + std::to_string(profiles++));
    std::filesystem::create_directories(profile);
    const std::string command = std::string("timeout 120 ") + kChromium +
                                " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run"
                                " --disable-background-networking --disable-component-update --disable-sync"
                                " --hide-scrollbars --user-data-dir='" +
                                profile.string() + "' " + action + " --window-size=" + window + " 'file://" +
                                page.string() + "' > '" + log.string() + "' 2>&1";
    return std::system(command.c_str());
}

struct EmbeddedFigure {
    std::string id;
    std::string source; // the data: URI of the <img>
};

/// The <figure id="fig-..."> elements of the report and the data URI of the image in each.
std::vector<EmbeddedFigure> embeddedFigures(const std::string& html) {
    std::vector<EmbeddedFigure> figures;
    const std::string marker = "<figure id=\"fig-";
    for (auto at = html.find(marker); at != std::string::npos; at = html.find(marker, at + 1)) {
        const auto id_start = at + marker.size();
        const auto id_end = html.find('"', id_start);
        const auto src_start = html.find("src=\"", id_end) + 5;
        const auto src_end = html.find('"', src_start);
        figures.push_back(
            {html.substr(id_start, id_end - id_start), html.substr(src_start, src_end - src_start)});
    }
    return figures;
}

} // namespace

TEST_CASE("report.html renders in headless Chromium with every figure drawn") {
    REQUIRE_MESSAGE(std::filesystem::exists(kChromium), "Debian's chromium is needed (.ci/packages.txt)");
    const testing::ScratchDirectory scratch("starcensus-report-chromium");
    const auto directory = testing::copyOfDemoRun(scratch, "run");
    const auto report = reports::writeCensusReport(directory);
    const auto figures = embeddedFigures(readFile(report.html));
    REQUIRE(figures.size() == report.figures.size());
    REQUIRE(figures.size() == 6); // no lumfunc.csv in this run: every figure but the luminosity function

    // 1. Chromium parses the page into the same number of figures, each with its image.
    const auto dom_log = scratch.path() / "dom.html";
    REQUIRE(runChromium(scratch, report.html, "--dump-dom", "1400,6000", dom_log) == 0);
    const std::string dom = readFile(dom_log);
    const auto parsed = embeddedFigures(dom);
    CHECK(parsed.size() == figures.size());

    // 2. The whole page, as a reader sees it: not blank.
    const auto page_png = scratch.path() / "page.png";
    REQUIRE(runChromium(scratch, report.html, "--screenshot=" + page_png.string(), "1400,6000",
                        scratch.path() / "page.log") == 0);
    const auto page = testing::readPng(page_png);
    CHECK(page.width == 1400);
    CHECK(page.inkFraction(0, 0, page.width, page.height) > 0.02);

    // 3. Each embedded figure, exactly as embedded (same data URI), in a cell of known place and size,
    //    plus one deliberately blank image as a control that the check can fail.
    constexpr int kCellWidth = 600;
    constexpr int kCellHeight = 450;
    const std::string blank_svg =
        "data:image/svg+xml;base64," +
        reports::base64Encode("<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"900\" "
                              "height=\"600\"><rect width=\"900\" height=\"600\" "
                              "fill=\"white\"/></svg>");
    std::vector<std::string> sources;
    for (const auto& figure : figures) {
        sources.push_back(figure.source);
    }
    sources.push_back(blank_svg);
    std::ostringstream sheet;
    sheet << "<!DOCTYPE html><html><head><style>body{margin:0;background:#fff}img{position:absolute;width:"
          << kCellWidth << "px;height:" << kCellHeight << "px;object-fit:contain}</style></head><body>";
    for (std::size_t i = 0; i < sources.size(); ++i) {
        sheet << "<img style=\"left:" << (i % 2) * kCellWidth << "px;top:" << (i / 2) * kCellHeight
              << "px\" src=\"" << sources[i] << "\">";
    }
    sheet << "</body></html>";
    const auto sheet_path = scratch.path() / "sheet.html";
    std::ofstream(sheet_path) << sheet.str();
    const int rows = static_cast<int>((sources.size() + 1) / 2);
    const auto sheet_png = scratch.path() / "sheet.png";
    REQUIRE(runChromium(scratch, sheet_path, "--screenshot=" + sheet_png.string(),
                        std::to_string(2 * kCellWidth) + "," + std::to_string(rows * kCellHeight),
                        scratch.path() / "sheet.log") == 0);
    const auto image = testing::readPng(sheet_png);
    REQUIRE(image.width == 2 * kCellWidth);
    for (std::size_t i = 0; i < sources.size(); ++i) {
        const int x0 = static_cast<int>(i % 2) * kCellWidth;
        const int y0 = static_cast<int>(i / 2) * kCellHeight;
        const double ink = image.inkFraction(x0, y0, x0 + kCellWidth, y0 + kCellHeight);
        if (i < figures.size()) {
            CAPTURE(figures[i].id);
            // A drawn figure (axes, labels, data) inks a few per cent of its cell at least (4-17% measured on
            // this run; common practice, no source).
            CHECK(ink > 0.02);
        } else {
            CHECK(ink < 0.001); // the blank control
        }
    }
}
