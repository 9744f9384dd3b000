#include "photometry/catalog/CsvCatalog.h"

#include "photometry/base/InputError.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <fstream>
#include <optional>

namespace starcensus::photometry {

namespace {

std::string_view trimmed(std::string_view text) {
    while (!text.empty() && (std::isspace(static_cast<unsigned char>(text.front())) || text.front() == '"')) {
        text.remove_prefix(1);
    }
    while (!text.empty() && (std::isspace(static_cast<unsigned char>(text.back())) || text.back() == '"')) {
        text.remove_suffix(1);
    }
    return text;
}

// Splits at commas outside double quotes; quotes and surrounding blanks are removed from each field.
void splitFields(std::string_view line, std::vector<std::string_view>& fields) {
    fields.clear();
    bool quoted = false;
    std::size_t start = 0;
    for (std::size_t i = 0; i < line.size(); ++i) {
        if (line[i] == '"') {
            quoted = !quoted;
        } else if (line[i] == ',' && !quoted) {
            fields.push_back(trimmed(line.substr(start, i - start)));
            start = i + 1;
        }
    }
    fields.push_back(trimmed(line.substr(start)));
}

bool isCommentOrBlank(std::string_view line) {
    const auto first = line.find_first_not_of(" \t\r");
    return first == std::string_view::npos || line[first] == '#';
}

bool isMissing(std::string_view text) {
    return text.empty() || (text.size() == 3 && std::tolower(static_cast<unsigned char>(text[0])) == 'n' &&
                            std::tolower(static_cast<unsigned char>(text[1])) == 'a' &&
                            std::tolower(static_cast<unsigned char>(text[2])) == 'n');
}

struct CsvField {
    std::size_t position;
    const ResolvedColumn* column;
};

// The lines of a CSV file that hold data (the header first), without comments, blank lines and '\r'.
class CsvLines {
  public:
    explicit CsvLines(const std::string& path) : path_(path), stream_(path, std::ios::binary) {
        if (!stream_) {
            throw InputError(path + ": no such file or not readable");
        }
    }
    /// The next line that is not a comment or blank; false at the end of the file.
    bool next() {
        while (std::getline(stream_, line_)) {
            ++line_number_;
            if (!line_.empty() && line_.back() == '\r') {
                line_.pop_back();
            }
            if (!isCommentOrBlank(line_)) {
                return true;
            }
        }
        if (stream_.bad()) {
            throw InputError(path_ + ": read error after line " + std::to_string(line_number_));
        }
        return false;
    }
    const std::string& line() const { return line_; }
    std::int64_t lineNumber() const { return line_number_; }

    /// The header row as column descriptions (no TFORM, UCD or unit: CSV states none).
    std::vector<ColumnDescription> header(std::vector<std::string_view>& fields) {
        if (!next()) {
            throw InputError(path_ + ": no header row (empty CSV file)");
        }
        splitFields(line_, fields);
        std::vector<ColumnDescription> columns;
        for (std::size_t i = 0; i < fields.size(); ++i) {
            columns.push_back({static_cast<int>(i + 1), std::string(fields[i]), "", "", ""});
        }
        return columns;
    }
    /// Splits the current line; throws InputError if it has not `expected` fields.
    void split(std::vector<std::string_view>& fields, std::size_t expected) const {
        splitFields(line_, fields);
        if (fields.size() != expected) {
            throw InputError(path_ + " line " + std::to_string(line_number_) + ": " +
                             std::to_string(fields.size()) + " fields, the header has " +
                             std::to_string(expected));
        }
    }

  private:
    std::string path_;
    std::ifstream stream_;
    std::string line_;
    std::int64_t line_number_ = 0;
};

// A number as the reader accepts it (an explicit leading '+' allowed); nullopt otherwise.
std::optional<double> parsedNumber(std::string_view text) {
    if (!text.empty() && text.front() == '+') { // from_chars does not take an explicit plus sign
        text.remove_prefix(1);
    }
    double value = 0.0;
    const char* end = text.data() + text.size();
    const auto [at, error] = std::from_chars(text.data(), end, value);
    if (text.empty() || error != std::errc{} || at != end) {
        return std::nullopt;
    }
    return value;
}

} // namespace

bool isCsvPath(const std::string& path) {
    std::string lower = path;
    std::transform(lower.begin(), lower.end(), lower.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    return lower.ends_with(".csv");
}

namespace detail {

FileScanResult scanCsvFile(const std::string& path, std::uint32_t file_index, const ScanSettings& settings) {
    CsvLines lines(path);
    FileScanResult result;
    FileScanReport& report = result.report;
    report.path = path;
    report.hdu_name = "CSV";

    std::vector<std::string_view> fields;
    const std::vector<ColumnDescription> columns = lines.header(fields);
    report.mapping =
        resolveColumns(columns, MappingRequest{settings.user_columns, settings.user_units, true}, path);

    std::vector<CsvField> mapped;
    for (const auto& resolved : report.mapping.fields) {
        if (resolved) {
            mapped.push_back({resolved->column_index, &*resolved});
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
        row.row_index = report.rows++;
        for (const auto& field : mapped) {
            std::string_view text = fields[field.position];
            if (isMissing(text)) {
                continue;
            }
            if (field.column->field == CatalogField::SpectralType) {
                setLiteratureType(row, text); // text, not a number; a refused string is data, not an error
                continue;
            }
            if (field.column->field == CatalogField::SourceId) {
                if (text.front() == '+') { // from_chars does not take an explicit plus sign
                    text.remove_prefix(1);
                }
                const char* end = text.data() + text.size();
                const auto [at, error] = std::from_chars(text.data(), end, row.source_id);
                if (text.empty() || error != std::errc{} || at != end) {
                    fail(field, text.empty() ? "+" : text);
                }
                continue;
            }
            const auto value = parsedNumber(text);
            if (!value) {
                fail(field, text);
            }
            row.*rowMember(field.column->field) = canonicalValue(*field.column, *value);
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
    profile.hdu_name = "CSV";
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
            if (isMissing(fields[i])) {
                column.countNull();
            } else if (const auto value = parsedNumber(fields[i])) {
                column.countNumber(*value);
            } else {
                column.countText(fields[i]);
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
