#pragma once
// Internals shared by the FITS and CSV readers: the per-file result and the row bookkeeping every reader
// applies in the same way (null counts, candidate test, counters, warnings).
#include "photometry/catalog/CatalogScan.h"

#include <charconv>
#include <cmath>
#include <initializer_list>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace starcensus::photometry::detail {

struct FileScanResult {
    FileScanReport report;
    std::vector<CatalogRow> candidates;
    std::string where; // the file (and HDU) as whole-file warnings name it
};

/// The rows of a file one scan reads: part `part` of `parts` equal row ranges, in row order. Only an
/// uncompressed FITS table is read in parts; of any other file, part 0 reads every row and the others
/// none, so that appending the parts (appendPart) always gives the whole file.
struct RowShare {
    unsigned part = 0;
    unsigned parts = 1;
};

/// A number as the text readers (CSV, ECSV, VOTable TABLEDATA) accept it: the whole text, an explicit
/// leading '+' allowed (which from_chars refuses); nullopt for anything else. T is double or std::int64_t.
template <class T>
std::optional<T> parseCellNumber(std::string_view text) {
    if (!text.empty() && text.front() == '+') {
        text.remove_prefix(1);
    }
    T value{};
    const char* end = text.data() + text.size();
    const auto [at, error] = std::from_chars(text.data(), end, value);
    if (text.empty() || error != std::errc{} || at != end) {
        return std::nullopt;
    }
    return value;
}

/// True when `path` ends in one of `suffixes`, compared without case (how readers claim their files).
bool endsWithAnyIgnoringCase(std::string_view path, std::initializer_list<std::string_view> suffixes);

/// The CatalogRow member of a floating-point field; empty for source_id and spectral_type.
RowMember rowMember(CatalogField field);

/// Fills the row's literature_* members from a spectral_type string as stored (surrounding blanks
/// ignored): Absent for a blank marker, Refused for a string the parser does not read, else Parsed.
void setLiteratureType(CatalogRow& row, std::string_view text);

/// Applies the candidate test of CatalogScan.h to decoded rows and keeps the counts. The report's
/// mapping must be set before construction. Row-wise readers call add(); the FITS reader, which decodes
/// column by column, counts nulls itself and calls passes() for every row and keep() for those that pass.
class ScanAccumulator {
  public:
    ScanAccumulator(FileScanResult& result, const ScanSettings& settings);

    /// One decoded row: every mapped field filled (canonical units), the others missing.
    void add(const CatalogRow& row) {
        if (null_counts_over_all_rows_) {
            countNulls(row);
        }
        if (passes(row.parallax_mas, row.parallax_error_mas)) {
            keep(row);
        }
    }
    /// Counts the row and applies the candidate test to its parallax and error (mas); true: a candidate.
    bool passes(double parallax_mas, double parallax_error_mas) {
        FileScanReport& report = result_.report;
        ScanCounts& counts = report.counts;
        ++counts.rows_read;
        if (!std::isfinite(parallax_mas)) {
            ++counts.rows_no_parallax;
            return false;
        }
        // The range starts as NaN, which every comparison fails.
        if (!(parallax_mas >= report.parallax_min_mas)) {
            report.parallax_min_mas = parallax_mas;
        }
        if (!(parallax_mas <= report.parallax_max_mas)) {
            report.parallax_max_mas = parallax_mas;
        }
        if (!std::isfinite(parallax_error_mas) || parallax_error_mas <= 0.0) {
            ++counts.rows_unusable_parallax_error;
            return false;
        }
        counts.rows_nonpositive_parallax += parallax_mas <= 0.0 ? 1 : 0;
        if (!(parallax_mas + candidate_sigma_ * parallax_error_mas > min_parallax_mas_)) {
            ++counts.rows_below_parallax_limit;
            return false;
        }
        return true;
    }
    /// A row that passed: counts its missing photometry (and its nulls, when they are counted over the
    /// candidates) and keeps it (unless only counting).
    void keep(const CatalogRow& row);
    /// Adds the warnings that depend on the whole file; `where` names the file (and HDU).
    void finish(const std::string& where);

  private:
    void countNulls(const CatalogRow& row);

  private:
    struct MappedField {
        std::size_t index;
        RowMember member;
    };
    FileScanResult& result_;
    std::vector<MappedField> mapped_doubles_;
    bool source_id_mapped_ = false;
    bool spectral_type_mapped_ = false;
    double min_parallax_mas_;
    double candidate_sigma_;
    bool keep_candidates_;
    bool null_counts_over_all_rows_;
};

/// The scanning threads settings.threads asks for (1 with a cfitsio that is not reentrant).
unsigned scanThreads(const ScanSettings& settings);

/// Scans the rows `share` selects of one file with the reader its name claims (CSV/ECSV, VOTable, else
/// FITS); rows get `file_index`.
FileScanResult scanFile(const std::string& path, FileIndex file_index, const ScanSettings& settings,
                        unsigned threads, RowShare share);

/// Throws InputError when a run is given more input files than CatalogRow::file_index holds.
void requireInputFileCount(std::size_t files);

/// Row `row` (0-based) of the table in `path` as a CatalogRow::row_index; throws InputError for a
/// table longer than it holds.
RowIndex tableRowIndex(const std::string& path, std::int64_t row);

/// The scan of whole files, in the order given: candidates concatenated, counts summed.
CatalogScan assembleScan(std::vector<FileScanResult>&& files);

/// Adds a part of a file scanned separately (the rows after those already in `whole`): counts, null
/// counts, parallax range and candidates.
void appendPart(FileScanResult& whole, FileScanResult&& part);

} // namespace starcensus::photometry::detail
