// libFuzzer target: the CSV reader (header row, comments, fields, numbers, column mapping) on arbitrary
// bytes. Any outcome but a result or an InputError is a failure.
#include "fuzz/FuzzInput.h"
#include "photometry/base/InputError.h"
#include "photometry/catalog/CatalogScan.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string path = starcensus::fuzz::writeFuzzInput(data, size, ".csv");
    starcensus::photometry::ScanSettings settings;
    settings.threads = 1;
    settings.null_counts_over_all_rows = true;
    settings.min_parallax_mas = 10.0;
    settings.user_units = {{"ra", "deg"}, {"dec", "deg"}};
    try {
        starcensus::photometry::scanCatalogs({path}, settings);
    } catch (const starcensus::InputError&) {
    }
    return 0;
}
