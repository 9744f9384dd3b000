// libFuzzer target: the FITS reader (header parsing through cfitsio and our own header records, the
// binary-table layout, column mapping, the row decoding of mapped windows) on arbitrary bytes. Any
// outcome but a result or an InputError is a failure (libFuzzer reports an escaping exception as a crash).
#include "fuzz/FuzzInput.h"
#include "photometry/base/InputError.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/FitsCatalog.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string path = starcensus::fuzz::writeFuzzInput(data, size, ".fits");
    try {
        starcensus::photometry::listHdus(path);
    } catch (const starcensus::InputError&) {
    }
    starcensus::photometry::ScanSettings settings;
    settings.threads = 1;
    settings.block_bytes = 4096; // several windows even for small tables
    settings.null_counts_over_all_rows = true;
    settings.min_parallax_mas = 10.0;
    try {
        starcensus::photometry::scanCatalogs({path}, settings);
    } catch (const starcensus::InputError&) {
    }
    return 0;
}
