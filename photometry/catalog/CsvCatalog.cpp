#include "photometry/catalog/CsvCatalog.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/EcsvHeader.h"
#include "photometry/catalog/InflatedBlocks.h"

#include <algorithm>
#include <array>
#include <bit>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstring>
#include <optional>

namespace starcensus::photometry {

namespace {

// std::isspace's blanks in the "C" locale, inline: the scan tests two bytes of every mapped field.
bool isBlank(char c) {
    return c == ' ' || c == '\t' || c == '\n' || c == '\v' || c == '\f' || c == '\r';
}

// A field without its surrounding blanks and double quotes.
std::string_view trimmed(std::string_view text) {
    while (!text.empty() && (isBlank(text.front()) || text.front() == '"')) {
        text.remove_prefix(1);
    }
    while (!text.empty() && (isBlank(text.back()) || text.back() == '"')) {
        text.remove_suffix(1);
    }
    return text;
}

// Splits at the delimiter outside double quotes; the fields keep their blanks and quotes (trimmed()
// removes them), so a scan trims only the fields it reads. A line without quotes (the usual case, and
// every line of the Gaia bulk files) takes a loop with one comparison per byte.
void splitUntrimmedFields(std::string_view line, char delimiter, std::vector<std::string_view>& fields) {
    fields.clear();
    std::size_t start = 0;
    if (line.find('"') == std::string_view::npos) {
        std::size_t i = 0;
        if constexpr (std::endian::native == std::endian::little) {
            // Eight bytes at a time: the high bit of each byte of `hits` marks a delimiter, exactly
            // (the carry-free zero-byte test, Anderson's "Bit Twiddling Hacks", from memory).
            constexpr std::uint64_t kLow7 = 0x7f7f7f7f7f7f7f7fULL;
            const std::uint64_t pattern = 0x0101010101010101ULL * static_cast<unsigned char>(delimiter);
            for (; i + 8 <= line.size(); i += 8) {
                std::uint64_t word = 0;
                std::memcpy(&word, line.data() + i, 8);
                const std::uint64_t x = word ^ pattern; // zero bytes where the delimiter is
                for (std::uint64_t hits = ~(((x & kLow7) + kLow7) | x | kLow7); hits != 0; hits &= hits - 1) {
                    const std::size_t at = i + static_cast<std::size_t>(std::countr_zero(hits) / 8);
                    fields.push_back(line.substr(start, at - start));
                    start = at + 1;
                }
            }
        }
        for (; i < line.size(); ++i) {
            if (line[i] == delimiter) {
                fields.push_back(line.substr(start, i - start));
                start = i + 1;
            }
        }
    } else {
        bool quoted = false;
        for (std::size_t i = 0; i < line.size(); ++i) {
            if (line[i] == '"') {
                quoted = !quoted;
            } else if (line[i] == delimiter && !quoted) {
                fields.push_back(line.substr(start, i - start));
                start = i + 1;
            }
        }
    }
    fields.push_back(line.substr(start));
}

bool isCommentOrBlank(std::string_view line) {
    const auto first = line.find_first_not_of(" \t\r");
    return first == std::string_view::npos || line[first] == '#';
}

// Missing: empty, "NaN" (any case), and the dashes and dots compilations print for "not measured" ("-",
// "--", "---", "...", as in the Kirkpatrick et al. 2019 Y-dwarf table). ECSV also writes "null" (the Gaia
// bulk releases do, from memory); in CSV that stays text.
bool isMissing(std::string_view text, bool ecsv) {
    return text.empty() || (ecsv && text == "null") || text == "-" || text == "--" || text == "---" ||
           text == "..." ||
           (text.size() == 3 && std::tolower(static_cast<unsigned char>(text[0])) == 'n' &&
            std::tolower(static_cast<unsigned char>(text[1])) == 'a' &&
            std::tolower(static_cast<unsigned char>(text[2])) == 'n');
}

struct CsvField {
    std::size_t position;
    const ResolvedColumn* column;
    // An ECSV float16/float32 column: its text is the shortest decimal of a single-precision value, read
    // back to that value (as the FITS path holds it), not to the nearest double of the decimal.
    bool single_precision;
};

// Lines of a text file, plain or gzip-compressed, streamed: never whole in memory. The bytes are inflated
// ahead in a thread of their own (InflatedBlocks); lines are found with memchr and returned in place,
// copied only when one straddles two blocks.
class TextLines {
  public:
    explicit TextLines(const std::string& path) : path_(path), blocks_(path) {}

    /// The next line without its '\n' (and '\r'), valid until the next call; false at the end. Throws
    /// InputError for a damaged or truncated compressed stream and for a NUL byte (binary data, not text).
    bool next(std::string_view& line) {
        carry_.clear();
        for (;;) {
            if (!rest_.empty()) {
                const auto* newline = static_cast<const char*>(std::memchr(rest_.data(), '\n', rest_.size()));
                if (newline != nullptr) {
                    const auto length = static_cast<std::size_t>(newline - rest_.data());
                    if (carry_.empty()) {
                        line = rest_.substr(0, length);
                    } else {
                        carry_.append(rest_.data(), length);
                        line = carry_;
                    }
                    rest_.remove_prefix(length + 1);
                    return finishLine(line);
                }
                carry_.append(rest_);
            }
            rest_ = blocks_.next();
            if (rest_.empty()) {
                if (blocks_.failed()) {
                    throw InputError(path_ + ": damaged or truncated compressed data after line " +
                                     std::to_string(line_number_) + " (" + blocks_.failure() + ")");
                }
                if (carry_.empty()) {
                    return false;
                }
                line = carry_; // the last line has no '\n'
                return finishLine(line);
            }
        }
    }
    std::int64_t lineNumber() const { return line_number_; }

  private:
    bool finishLine(std::string_view& line) {
        ++line_number_;
        if (!line.empty() && line.back() == '\r') {
            line.remove_suffix(1);
        }
        if (std::memchr(line.data(), '\0', line.size()) != nullptr) {
            throw InputError(path_ + " line " + std::to_string(line_number_) +
                             ": a NUL byte (binary data, not text)");
        }
        return true;
    }

    std::string path_;
    detail::InflatedBlocks blocks_;
    std::string_view rest_; // the part of the current block after the lines returned
    std::string carry_;     // a line that began in an earlier block
    std::int64_t line_number_ = 0;
};

// The lines of a CSV or ECSV file that hold data (the header first), without comments, blank lines and
// '\r'. An ECSV file (first line "# %ECSV ...") declares its columns, units, UCDs and delimiter in the
// YAML of its leading comment lines (EcsvHeader.h); a plain CSV file states none of them.
class CsvLines {
  public:
    explicit CsvLines(const std::string& path) : path_(path), lines_(path) {
        if (!lines_.next(line_) || !isEcsvSignature(line_)) {
            pending_ = true; // the first line is an ordinary one
            return;
        }
        std::string yaml;
        while (lines_.next(line_) && line_.starts_with("#")) {
            yaml += line_.substr(line_.starts_with("# ") ? 2 : 1);
            yaml += '\n';
        }
        pending_ = true;
        ecsv_ = parseEcsvHeader(yaml, path);
    }
    /// The next line that is not a comment or blank; false at the end of the file.
    bool next() {
        while (pending_ || lines_.next(line_)) {
            pending_ = false;
            if (!isCommentOrBlank(line_)) {
                return true;
            }
        }
        return false;
    }
    std::string_view line() const { return line_; }
    std::int64_t lineNumber() const { return lines_.lineNumber(); }
    bool isEcsv() const { return ecsv_.has_value(); }
    const char* kind() const { return ecsv_ ? "ECSV" : "CSV"; }

    /// The header row as column descriptions: for ECSV those its YAML declares (which must be the row's
    /// names, in order), for CSV names only.
    std::vector<ColumnDescription> header(std::vector<std::string_view>& fields) {
        if (!next()) {
            throw InputError(path_ + ": no header row (empty " + kind() + " file)");
        }
        splitUntrimmedFields(line_, delimiter(), fields);
        std::transform(fields.begin(), fields.end(), fields.begin(), trimmed);
        if (ecsv_) {
            const auto& declared = ecsv_->columns;
            const bool same = fields.size() == declared.size() &&
                              std::equal(fields.begin(), fields.end(), declared.begin(),
                                         [](std::string_view name, const ColumnDescription& column) {
                                             return name == column.name;
                                         });
            if (!same) {
                throw InputError(path_ + " line " + std::to_string(lineNumber()) +
                                 ": the header row's column names are not those the ECSV header declares");
            }
            return declared;
        }
        std::vector<ColumnDescription> columns;
        for (std::size_t i = 0; i < fields.size(); ++i) {
            columns.push_back({static_cast<int>(i + 1), std::string(fields[i]), "", "", ""});
        }
        return columns;
    }
    /// Splits the current line into untrimmed fields (trimmed() gives a field's text); throws InputError
    /// if it has not `expected` fields.
    void split(std::vector<std::string_view>& fields, std::size_t expected) const {
        splitUntrimmedFields(line_, delimiter(), fields);
        if (fields.size() != expected) {
            throw InputError(path_ + " line " + std::to_string(lineNumber()) + ": " +
                             std::to_string(fields.size()) + " fields, the header has " +
                             std::to_string(expected));
        }
    }

  private:
    char delimiter() const { return ecsv_ ? ecsv_->delimiter : ','; }

    std::string path_;
    TextLines lines_;
    std::string_view line_; // valid until the next read of lines_
    bool pending_ = false;  // line_ holds a line next() has not returned yet
    std::optional<EcsvHeader> ecsv_;
};

} // namespace

bool isCsvPath(const std::string& path) {
    return detail::endsWithAnyIgnoringCase(path,
                                           {".csv", ".csv.gz", ".csv.bz2", ".ecsv", ".ecsv.gz", ".ecsv.bz2"});
}

namespace detail {

FileScanResult scanCsvFile(const std::string& path, FileIndex file_index, const ScanSettings& settings) {
    CsvLines lines(path);
    FileScanResult result;
    FileScanReport& report = result.report;
    report.path = path;
    report.hdu_name = lines.kind();

    std::vector<std::string_view> fields;
    const std::vector<ColumnDescription> columns = lines.header(fields);
    report.mapping =
        resolveColumns(columns, MappingRequest{settings.user_columns, settings.user_units, true}, path);

    std::vector<CsvField> mapped;
    for (const auto& resolved : report.mapping.fields) {
        if (resolved) {
            const std::string& datatype = columns[resolved->column_index].tform;
            mapped.push_back(
                {resolved->column_index, &*resolved, datatype == "float32" || datatype == "float16"});
        }
    }
    ScanAccumulator accumulator(result, settings);
    auto fail = [&](const CsvField& field, std::string_view text) {
        throw InputError(path + " line " + std::to_string(lines.lineNumber()) + ": column " +
                         field.column->column_name + " (" + std::string(fieldName(field.column->field)) +
                         "): '" + std::string(text) + "' is not a number");
    };
    while (lines.next()) {
        lines.split(fields, columns.size());
        CatalogRow row;
        row.file_index = file_index;
        row.row_index = detail::tableRowIndex(path, report.rows++);
        for (const auto& field : mapped) {
            const std::string_view text = trimmed(fields[field.position]);
            if (isMissing(text, lines.isEcsv())) {
                continue;
            }
            if (field.column->field == CatalogField::SpectralType) {
                setLiteratureType(row, text); // text, not a number; a refused string is data, not an error
                continue;
            }
            if (field.column->field == CatalogField::SourceId) {
                const auto id = parseCellNumber<std::int64_t>(text);
                if (!id) {
                    fail(field, text);
                }
                row.source_id = *id;
                continue;
            }
            const auto value = parseCellNumber<double>(text);
            if (!value) {
                fail(field, text);
            }
            const double stored = field.single_precision ? static_cast<float>(*value) : *value;
            rowMember(field.column->field).set(row, canonicalValue(*field.column, stored));
        }
        accumulator.add(row);
        if (settings.progress != nullptr && report.rows % 65536 == 0) {
            settings.progress->items_done.fetch_add(65536, std::memory_order_relaxed);
        }
    }
    if (settings.progress != nullptr) {
        settings.progress->items_done.fetch_add(report.rows % 65536, std::memory_order_relaxed);
    }
    accumulator.finish(path);
    return result;
}

TableProfile profileCsvTable(const std::string& path) {
    CsvLines lines(path);
    TableProfile profile;
    profile.where = path;
    profile.hdu_name = lines.kind();
    std::vector<std::string_view> fields;
    for (auto& description : lines.header(fields)) {
        ColumnProfile column;
        column.description = std::move(description);
        profile.columns.push_back(std::move(column));
    }
    while (lines.next()) {
        lines.split(fields, profile.columns.size());
        ++profile.rows;
        for (std::size_t i = 0; i < fields.size(); ++i) {
            ColumnProfile& column = profile.columns[i];
            const std::string_view text = trimmed(fields[i]);
            if (isMissing(text, lines.isEcsv())) {
                column.countNull();
            } else if (const auto value = parseCellNumber<double>(text)) {
                column.countNumber(*value);
            } else {
                column.countText(text);
            }
        }
    }
    for (auto& column : profile.columns) {
        column.settleKindFromCells();
    }
    return profile;
}

} // namespace detail

} // namespace starcensus::photometry
