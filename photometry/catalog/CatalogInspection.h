#pragma once
// `inspect`: what the reader makes of each input file, for the user to check before a census, and the way
// into a table whose columns the mapping does not know. Per file: its HDUs; every column of the table
// (kind, TFORM, unit, UCD, nulls, range or sample texts); for every field the column it maps and why
// (user mapping, UCD or name), or "none" with the likeliest candidates (ColumnSuggestion.h, suggested,
// never applied); the mapping as --column/--unit options and as INI lines for --config; what a run can
// make with that mapping; and, when every field resolves, the scan's counts and parallax range. A file
// that cannot be read is reported (its error kept as text), not thrown, so one bad file does not hide what
// the others say; a missing required field is reported too, with the one-line error a run would stop with.
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/ColumnProfile.h"
#include "photometry/catalog/ColumnSuggestion.h"
#include "photometry/catalog/FitsCatalog.h"

#include <array>
#include <map>
#include <string>
#include <vector>

namespace starcensus::photometry {

struct CatalogInspection {
    std::string path;
    std::vector<HduSummary> hdus; // empty for CSV or an unreadable file
    TableProfile table;           // every column; valid when error is empty
    MappingAttempt mapping;       // what each field maps to, or the problem that leaves it unmapped
    std::array<std::vector<ColumnCandidate>, kCatalogFieldCount> candidates; // for unmapped fields
    std::string hdu_option;                        // the --hdu the mapping text names ("" for CSV)
    std::map<std::string, std::string> user_units; // --unit as given
    bool scanned = false;   // every field resolved and the rows were scanned and counted
    FileScanReport scan;    // valid when scanned
    std::string scan_error; // every field resolved but the scan refused a cell ("'-' is not a number")
    std::string error;      // the InputError message, "" if the file was read
};

/// Inspects every file (rows are counted, none kept). settings.min_parallax_mas sets the candidate count.
std::vector<CatalogInspection> inspectCatalogs(const std::vector<std::string>& paths,
                                               const ScanSettings& settings);

/// Plain-text report of inspectCatalogs, one block per file.
std::string formatInspection(const std::vector<CatalogInspection>& inspections);

/// The mapping of one inspection as options: "--column parallax=PLX --unit parallax=mas ...", and the
/// same as INI lines ("column = parallax=PLX\n..."), which `--config` reads. Only mapped fields appear.
std::string mappingAsOptions(const CatalogInspection& inspection);
std::string mappingAsIni(const CatalogInspection& inspection);

} // namespace starcensus::photometry
