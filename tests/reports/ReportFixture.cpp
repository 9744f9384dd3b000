#include "tests/reports/ReportFixture.h"

#include "census/CensusOptions.h"
#include "census/mock/Neighbourhood.h"
#include "census/mock/Output.h"
#include "reports/CensusPipeline.h"

#include <png.h>

#include <algorithm>
#include <cstdlib>
#include <sstream>
#include <stdexcept>

namespace starcensus::testing {

const std::filesystem::path& demoRunDirectory() {
    static const ScratchDirectory scratch("starcensus-report-run");
    static const bool written = [] {
        census::mock::MockSettings mock_settings;
        mock_settings.radius_max_pc = 12.0;
        mock_settings.wide_companion_fraction = 0.15; // systems for the multiplicity figure
        const auto mock = census::mock::simulateNeighbourhood(mock_settings, 3);
        census::mock::writeMockCatalog(scratch.path() / "mock.fits", mock);
        reports::PipelineSettings settings;
        settings.inputs = {(scratch.path() / "mock.fits").string()};
        settings.output_directory = scratch.path();
        settings.census.radii_text = "5,10";
        settings.census.group_definitions = {"FGK=F,G,K"};
        settings.census.draws.draws = 200;
        settings.census.draws.seed = 3;
        census::validate(settings.census);
        std::ostringstream log;
        reports::runCensusPipeline(settings, log);
        return true;
    }();
    (void)written;
    return scratch.path();
}

std::filesystem::path copyOfDemoRun(const ScratchDirectory& scratch, const std::string& name) {
    const auto directory = scratch.path() / name;
    std::filesystem::create_directories(directory);
    for (const char* file : {"sample.fits", "fractions.json", "fractions.csv"}) {
        std::filesystem::copy_file(demoRunDirectory() / file, directory / file,
                                   std::filesystem::copy_options::overwrite_existing);
    }
    return directory;
}

double RgbImage::inkFraction(int x0, int y0, int x1, int y1) const {
    x0 = std::clamp(x0, 0, width);
    x1 = std::clamp(x1, 0, width);
    y0 = std::clamp(y0, 0, height);
    y1 = std::clamp(y1, 0, height);
    std::size_t ink = 0;
    for (int y = y0; y < y1; ++y) {
        for (int x = x0; x < x1; ++x) {
            const auto* pixel = &pixels[(static_cast<std::size_t>(y) * width + x) * 3];
            ink += (pixel[0] < 231 || pixel[1] < 231 || pixel[2] < 231) ? 1 : 0;
        }
    }
    const auto area = static_cast<double>(std::max(1, (x1 - x0) * (y1 - y0)));
    return static_cast<double>(ink) / area;
}

RgbImage readPng(const std::filesystem::path& path) {
    png_image image{};
    image.version = PNG_IMAGE_VERSION;
    if (png_image_begin_read_from_file(&image, path.c_str()) == 0) {
        throw std::runtime_error("cannot read PNG " + path.string() + ": " + image.message);
    }
    image.format = PNG_FORMAT_RGB;
    RgbImage result;
    result.width = static_cast<int>(image.width);
    result.height = static_cast<int>(image.height);
    result.pixels.resize(PNG_IMAGE_SIZE(image));
    png_color white{255, 255, 255};
    if (png_image_finish_read(&image, &white, result.pixels.data(), 0, nullptr) == 0) {
        throw std::runtime_error("cannot decode PNG " + path.string() + ": " + image.message);
    }
    return result;
}

} // namespace starcensus::testing
