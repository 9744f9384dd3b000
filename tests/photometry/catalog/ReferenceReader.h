#pragma once
// The straightforward way to read a catalog, for tests only: cfitsio's fits_read_col column by column
// (cfitsio applies TSCAL, TZERO, TNULL and the byte order), then the candidate test written out plainly.
// The fast block scan must give exactly the same rows.
#include "photometry/catalog/CatalogScan.h"

#include <string>
#include <vector>

namespace starcensus::testing {

/// Every row of the table `report` describes (its HDU and mapping), in canonical units.
std::vector<photometry::CatalogRow> readCatalogReference(const photometry::FileScanReport& report,
                                                         std::uint32_t file_index);

/// The rows the scan keeps: parallax and a positive finite error present, and
/// parallax + candidate_sigma * error > min_parallax_mas.
std::vector<photometry::CatalogRow> referenceCandidates(const std::vector<photometry::CatalogRow>& rows,
                                                        const photometry::ScanSettings& settings);

/// Checks two row lists are identical field by field (NaN equals NaN).
void checkSameRows(const std::vector<photometry::CatalogRow>& actual,
                   const std::vector<photometry::CatalogRow>& expected);

} // namespace starcensus::testing
