#pragma once
// What every column of a table holds, for `inspect`: the column's own description (name, TFORM, unit,
// UCD), the kind of its values, its null count, and the range of its numbers or a few of its texts.
// Unlike the scan, which decodes only mapped fields, a profile reads every cell of every column (with the
// scan's decoders, so both agree on values and nulls).
#include "photometry/catalog/ColumnMapping.h"

#include <cstdint>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

namespace starcensus::photometry {

enum class ColumnKind : std::uint8_t {
    Number, // every non-null cell is a number (FITS: a numeric column of repeat 1)
    Text,   // every non-null cell is text (FITS: TFORM rA)
    Mixed,  // CSV only: some cells are numbers, some are not ("-", "null"): a run refuses the column
    Other,  // FITS vectors, logical, bit, complex and variable-length columns: not read by the census
};

std::string_view kindName(ColumnKind kind); // "number", "text", "mixed", "other"

struct ColumnProfile {
    ColumnDescription description;
    ColumnKind kind = ColumnKind::Number;
    std::int64_t nulls = 0;   // empty cells, NaN, TNULL, blank text
    std::int64_t numbers = 0; // cells read as numbers
    std::int64_t texts = 0;   // non-null cells that are not numbers
    double min = std::numeric_limits<double>::quiet_NaN();
    double max = std::numeric_limits<double>::quiet_NaN();
    std::vector<std::string> samples; // up to kSampleCount distinct texts, in the order first seen

    static constexpr std::size_t kSampleCount = 3;

    void countNull() { ++nulls; }
    void countNumber(double value);
    void countText(std::string_view text);
    /// Sets kind from the counts (CSV, where the kind is what the cells turned out to be).
    void settleKindFromCells();
};

struct TableProfile {
    std::string where;    // the file, and for FITS the HDU: "path [HDU 1 NAME]"
    int hdu_index = 0;    // 0 for CSV
    std::string hdu_name; // EXTNAME, "" if none; "CSV" for CSV
    std::int64_t rows = 0;
    std::vector<ColumnProfile> columns; // in table order
};

/// Profiles the table a scan with these `hdu` settings would read (see ScanSettings::hdu); CSV for paths
/// ending in ".csv", FITS otherwise (a gzip file read as a stream; other compressed forms through
/// cfitsio). Throws InputError naming the file (and HDU) for unreadable input.
TableProfile profileTable(const std::string& path, const std::string& hdu);

/// The columns as the mapping sees them.
std::vector<ColumnDescription> descriptionsOf(const TableProfile& profile);

} // namespace starcensus::photometry
