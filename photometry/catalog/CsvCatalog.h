#pragma once
// CSV and ECSV input, plain or gzip-compressed (streamed). CSV: one header row of column names (lines
// starting with "#" before it and between rows are comments), comma-separated values; columns are mapped
// by name only (CSV has no UCDs) and no file states a unit, so units come from --unit; a parallax column
// must have one unless it carries the Gaia name "parallax" or "parallax_error", which is in mas by that
// release's definition (see MappingRequest). ECSV (a first line "# %ECSV 1.0", EcsvHeader.h; astropy's
// writer and the Gaia bulk releases, whose files are named .csv.gz): the YAML header declares each
// column's datatype, unit and UCD (meta.ucd), used as FITS's TFORM, TUNIT and TUCD are, and the delimiter.
// In both, empty fields, "", "NaN" (any case) and the not-measured marks "-", "--", "---", "..." are
// missing, and in ECSV also "null".
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/ColumnProfile.h"

#include <cstdint>
#include <string>

namespace starcensus::photometry {

/// True for names ending in ".csv" or ".ecsv", also with ".gz" or ".bz2" (any case): the files
/// scanCatalogs reads as CSV or ECSV (which of the two, the first line says).
bool isCsvPath(const std::string& path);

namespace detail {
/// Scans one CSV file (see CatalogScan.h); rows get `file_index` and their 0-based data-row index.
FileScanResult scanCsvFile(const std::string& path, FileIndex file_index, const ScanSettings& settings);
/// Profiles every column of a CSV file (see ColumnProfile.h).
TableProfile profileCsvTable(const std::string& path);
} // namespace detail

} // namespace starcensus::photometry
