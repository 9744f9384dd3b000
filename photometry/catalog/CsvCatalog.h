#pragma once
// CSV input, as a convenience for small lists: one header row of column names (lines starting with "#"
// before it and between rows are comments), comma-separated values, empty fields and "NaN" (any case)
// are missing. Columns are mapped by name only (CSV has no UCDs) and no file states a unit, so units
// come from --unit; a parallax column must have one unless it carries the Gaia name "parallax" or
// "parallax_error", which is in mas by that release's definition (see MappingRequest).
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/ColumnProfile.h"

#include <cstdint>
#include <string>

namespace starcensus::photometry {

/// True for names ending in ".csv" (any case): the files scanCatalogs reads as CSV.
bool isCsvPath(const std::string& path);

namespace detail {
/// Scans one CSV file (see CatalogScan.h); rows get `file_index` and their 0-based data-row index.
FileScanResult scanCsvFile(const std::string& path, std::uint32_t file_index, const ScanSettings& settings);
/// Profiles every column of a CSV file (see ColumnProfile.h).
TableProfile profileCsvTable(const std::string& path);
} // namespace detail

} // namespace starcensus::photometry
