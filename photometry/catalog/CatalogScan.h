#pragma once
// Streaming scan of input catalogs (FITS binary tables, or CSV as a convenience) into the candidate rows a
// census needs. Only rows that can lie inside the largest radius are kept, so memory follows the number
// of candidates, not the size of the files.
//
// Candidate test (common practice, no source): parallax_mas + candidate_sigma * parallax_error_mas >
// min_parallax_mas, i.e. the star is within candidate_sigma standard errors of the volume. Negative and
// zero parallaxes are measurements, not flags, and are kept when they pass (and counted).
// Rows without a parallax, or with a missing, non-finite or non-positive parallax error, are skipped
// and counted.
#include "photometry/base/Progress.h"
#include "photometry/catalog/CatalogRow.h"
#include "photometry/catalog/ColumnMapping.h"

#include <array>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <map>
#include <string>
#include <vector>

namespace starcensus {
class ProcessGroup; // photometry/base/ProcessGroup.h
} // namespace starcensus

namespace starcensus::photometry {

/// Settings of one scan. Defaults are stated with their units.
struct ScanSettings {
    std::map<std::string, std::string> user_columns; // logical field -> column name (--column)
    std::map<std::string, std::string> user_units;   // logical field -> unit of a column whose file gives
                                                     // none (--unit; always needed for CSV parallaxes
                                                     // not named "parallax"/"parallax_error")
    std::string hdu;               // "" = first binary table; digits = 0-based HDU index (0 = primary),
                                   // as in cfitsio's file.fits[1]; otherwise an EXTNAME (case-insensitive)
    double min_parallax_mas = 0.0; // 1000 / largest radius in pc, from the caller
    double candidate_sigma = 3.0;  // k in the candidate test, in parallax standard errors
    std::size_t block_bytes = std::size_t{8} << 20; // bytes of table rows read or mapped per block
                                                    // and thread (8 MiB), decoded in ~16 KiB slices
    unsigned threads = 0; // scanning threads; 0 = std::thread::hardware_concurrency(). Files are scanned
                          // in parallel; with fewer files than threads, uncompressed FITS files are also
                          // split into row ranges scanned in parallel. Each CSV, ECSV or VOTable
                          // file also has its own inflate thread (InflatedBlocks.h)
    bool keep_candidates = true;            // false: only count and report (used by inspect)
    bool null_counts_over_all_rows = false; // true: FileScanReport::null_counts over every row (inspect);
                                            // false: over the candidates only, which spares the scan a
                                            // pass over every mapped field of every row
    ProgressCounters* progress =
        nullptr; // optional: rows read and files finished (photometry/base/Progress.h)
};

/// Row counts of one file or of all files. Photometry counts refer to the candidates.
struct ScanCounts {
    std::int64_t rows_read = 0;
    std::int64_t rows_no_parallax = 0;             // parallax null or non-finite: skipped
    std::int64_t rows_unusable_parallax_error = 0; // error null, non-finite or <= 0: skipped
    std::int64_t rows_below_parallax_limit = 0;    // failed the candidate test
    std::int64_t rows_nonpositive_parallax = 0;    // parallax <= 0 among rows with a usable error
    std::int64_t candidates = 0;
    std::int64_t candidates_nonpositive_parallax = 0; // kept although parallax <= 0
    std::int64_t candidates_missing_g = 0;
    std::int64_t candidates_missing_bp = 0;
    std::int64_t candidates_missing_rp = 0;
    std::int64_t candidates_missing_j = 0;
    std::int64_t candidates_missing_h = 0;
    std::int64_t candidates_missing_ks = 0;
    // Candidates whose spectral_type string parseLiteratureType() refused (kept, with no literature type).
    std::int64_t candidates_refused_spectral_type = 0;

    ScanCounts& operator+=(const ScanCounts& other);
    bool operator==(const ScanCounts&) const = default;
};

/// What a scan learned about one input file.
struct FileScanReport {
    std::string path;
    int hdu_index = 0;    // 0-based HDU index of the table read (0 for CSV)
    std::string hdu_name; // EXTNAME, "" if none; "CSV" for CSV input
    std::int64_t rows = 0;
    ColumnMapping mapping;
    // Null values per field (missing, NaN, TNULL, or a flux-over-error <= 0) over every row, or over the
    // candidates (ScanSettings::null_counts_over_all_rows); only fields that are mapped can be non-zero.
    std::array<std::int64_t, kCatalogFieldCount> null_counts{};
    bool null_counts_over_all_rows = false;
    double parallax_min_mas = std::numeric_limits<double>::quiet_NaN(); // over rows with a parallax
    double parallax_max_mas = std::numeric_limits<double>::quiet_NaN();
    ScanCounts counts;
    // Expected but notable outcomes for the caller to print: zero rows, a mapped column that is null in
    // every row (or every candidate), every parallax missing.
    std::vector<std::string> warnings;
};

struct CatalogScan {
    std::vector<CatalogRow> candidates; // in file order, then row order; file_index follows `paths`
    std::vector<FileScanReport> files;  // one per input path, in order
    ScanCounts totals;
};

/// Scans every file (several at once, one thread per file up to settings.threads; a single large file in
/// row ranges on several threads) and merges the results in the order of `paths`, so the result does not
/// depend on the thread count. Uncompressed FITS data are read with pread(2) in blocks; gzip files are
/// inflated block by block as they are read (never whole in memory). A path ending in ".csv"
/// (any case) is read as CSV, anything else as FITS (cfitsio: also .gz and other compressed forms).
/// Throws InputError (one line naming the file, HDU and column) for unreadable input; when several
/// files fail, the error of the first in `paths` is thrown.
CatalogScan scanCatalogs(const std::vector<std::string>& paths, const ScanSettings& settings);

/// scanCatalogs spread over the processes of `group` (each calls it with the same paths and settings):
/// whole files, and uncompressed FITS tables larger than an even share of all the bytes in row ranges,
/// are dealt out by size; each rank scans its share (settings.threads threads) and sends it to rank 0,
/// which returns exactly what scanCatalogs gives (files in order, then rows), or throws its error (the
/// first failing file's). The other ranks return an empty scan. With one process: scanCatalogs.
CatalogScan scanCatalogsAcross(ProcessGroup& group, const std::vector<std::string>& paths,
                               const ScanSettings& settings);

} // namespace starcensus::photometry
