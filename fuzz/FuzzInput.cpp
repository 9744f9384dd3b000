#include "fuzz/FuzzInput.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/CatalogScan.h"

#include <fstream>
#include <unistd.h>

namespace starcensus::fuzz {

std::string writeFuzzInput(const std::uint8_t* data, std::size_t size, const std::string& suffix) {
    static const std::filesystem::path directory = [] {
        auto path =
            std::filesystem::temp_directory_path() / ("starcensus-fuzz-" + std::to_string(::getpid()));
        std::filesystem::create_directories(path);
        return path;
    }();
    const auto path = directory / ("input" + suffix);
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
    return path.string();
}

void scanExpectingInputErrors(const std::string& path, const std::map<std::string, std::string>& user_units) {
    photometry::ScanSettings settings;
    settings.threads = 1;
    settings.null_counts_over_all_rows = true;
    settings.min_parallax_mas = 10.0;
    settings.user_units = user_units;
    try {
        photometry::scanCatalogs({path}, settings);
    } catch (const InputError&) {
    }
}

} // namespace starcensus::fuzz
