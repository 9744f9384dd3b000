#pragma once
// `inspect`: what the reader makes of each input file, for the user to check before a census: its HDUs,
// which column feeds each field and why (user mapping, UCD or name), units, null counts and the parallax
// range. A file that cannot be read is reported (its error kept as text), not thrown, so one bad file
// does not hide what the others say.
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/FitsCatalog.h"

#include <string>
#include <vector>

namespace starcensus::photometry {

struct CatalogInspection {
    std::string path;
    std::vector<HduSummary> hdus; // empty for CSV or an unreadable file
    FileScanReport scan;          // valid when error is empty
    std::string error;            // the InputError message, "" if the file was read
};

/// Inspects every file (rows are counted, none kept). settings.min_parallax_mas sets the candidate count.
std::vector<CatalogInspection> inspectCatalogs(const std::vector<std::string>& paths,
                                               const ScanSettings& settings);

/// Plain-text report of inspectCatalogs, one block per file.
std::string formatInspection(const std::vector<CatalogInspection>& inspections);

} // namespace starcensus::photometry
