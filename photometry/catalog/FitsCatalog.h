#pragma once
// FITS binary-table input, read through cfitsio (which also opens .gz and other compressed files).
// The scan reads raw rows in large blocks and decodes only the mapped fields from their big-endian bytes
// (TFORM B, I, J, K, E, D with repeat 1; TSCALn/TZEROn and integer TNULLn honoured; NaN is null in
// floating-point columns), column by column within a block. Uncompressed data are read with pread(2)
// (several row ranges at once when threads allow); gzip files are inflated as they are read, after the
// headers up to the table have been parsed from the stream; other compressed forms (compress, pkzip)
// are left to cfitsio, which inflates them into memory.
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/ColumnProfile.h"

#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::photometry {

/// One header-data unit of a FITS file.
struct HduSummary {
    int index = 0;           // 0-based (0 = primary), as accepted by ScanSettings::hdu
    std::string type;        // "image", "binary table" or "ASCII table"
    std::string name;        // EXTNAME, "" if none
    std::int64_t rows = 0;   // tables: NAXIS2; images: 0
    int columns = 0;         // tables: TFIELDS; images: 0
    std::string image_shape; // images: "2048x4096", "none" without data; tables: ""

    bool operator==(const HduSummary&) const = default;
};

/// Every HDU of a FITS file; throws InputError naming the file if it cannot be read. A gzip-compressed
/// file is listed as it is inflated (memory does not grow with the file).
std::vector<HduSummary> listHdus(const std::string& path);

namespace detail {
/// Profiles every column of the table `hdu` selects (see ColumnProfile.h and ScanSettings::hdu), rows read
/// in order in blocks (gzip files as a stream) and decoded as the scan decodes them.
TableProfile profileFitsTable(const std::string& path, const std::string& hdu);
/// Scans one FITS file (see CatalogScan.h), or the rows of it `share` selects, with up to `threads`
/// threads; rows get `file_index`. The whole-file warnings are added only when `share` is the whole file.
FileScanResult scanFitsFile(const std::string& path, FileIndex file_index, const ScanSettings& settings,
                            unsigned threads, RowShare share = {});
} // namespace detail

} // namespace starcensus::photometry
