// libFuzzer target: the VOTable reader (expat, FIELD attributes and arraysizes, TABLEDATA cells, base64
// BINARY and BINARY2 rows with their null flags, column mapping) on arbitrary bytes. Any outcome but a
// result or an InputError is a failure.
#include "fuzz/FuzzInput.h"
#include "photometry/base/InputError.h"
#include "photometry/catalog/CatalogScan.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string path = starcensus::fuzz::writeFuzzInput(data, size, ".vot");
    starcensus::photometry::ScanSettings settings;
    settings.threads = 1;
    settings.null_counts_over_all_rows = true;
    settings.min_parallax_mas = 10.0;
    try {
        starcensus::photometry::scanCatalogs({path}, settings);
    } catch (const starcensus::InputError&) {
    }
    return 0;
}
