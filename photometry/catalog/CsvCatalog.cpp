#include "photometry/catalog/CsvCatalog.h"

#include "photometry/base/InputError.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <fstream>

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

} // namespace

bool isCsvPath(const std::string& path) {
    std::string lower = path;
    std::transform(lower.begin(), lower.end(), lower.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    return lower.ends_with(".csv");
}

namespace detail {

FileScanResult scanCsvFile(const std::string& path, std::uint32_t file_index, const ScanSettings& settings) {
    std::ifstream stream(path, std::ios::binary);
    if (!stream) {
        throw InputError(path + ": no such file or not readable");
    }
    FileScanResult result;
    FileScanReport& report = result.report;
    report.path = path;
    report.hdu_name = "CSV";

    std::string line;
    std::int64_t line_number = 0;
    auto nextDataLine = [&]() {
        while (std::getline(stream, line)) {
            ++line_number;
            if (!line.empty() && line.back() == '\r') {
                line.pop_back();
            }
            if (!isCommentOrBlank(line)) {
                return true;
            }
        }
        if (stream.bad()) {
            throw InputError(path + ": read error after line " + std::to_string(line_number));
        }
        return false;
    };
    if (!nextDataLine()) {
        throw InputError(path + ": no header row (empty CSV file)");
    }
    std::vector<std::string_view> fields;
    splitFields(line, fields);
    std::vector<ColumnDescription> columns;
    for (std::size_t i = 0; i < fields.size(); ++i) {
        columns.push_back({static_cast<int>(i + 1), std::string(fields[i]), "", "", ""});
    }
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
        throw InputError(path + " line " + std::to_string(line_number) + ": column " +
                         field.column->column_name + " (" + std::string(fieldName(field.column->field)) +
                         "): '" + std::string(text) + "' is not a number");
    };
    while (nextDataLine()) {
        splitFields(line, fields);
        if (fields.size() != columns.size()) {
            throw InputError(path + " line " + std::to_string(line_number) + ": " +
                             std::to_string(fields.size()) + " fields, the header has " +
                             std::to_string(columns.size()));
        }
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
            if (text.front() == '+') { // from_chars does not take an explicit plus sign
                text.remove_prefix(1);
            }
            if (text.empty()) {
                fail(field, "+");
                continue;
            }
            const char* end = text.data() + text.size();
            if (field.column->field == CatalogField::SourceId) {
                const auto [at, error] = std::from_chars(text.data(), end, row.source_id);
                if (error != std::errc{} || at != end) {
                    fail(field, text);
                }
                continue;
            }
            double value = 0.0;
            const auto [at, error] = std::from_chars(text.data(), end, value);
            if (error != std::errc{} || at != end) {
                fail(field, text);
            }
            row.*rowMember(field.column->field) = canonicalValue(*field.column, value);
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

} // namespace detail

} // namespace starcensus::photometry
