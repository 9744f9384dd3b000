#include "photometry/base/TextTable.h"

#include "photometry/base/InputError.h"

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <sstream>

namespace starcensus {

namespace {
std::vector<std::string> splitWhitespace(const std::string& line) {
    std::istringstream stream(line);
    std::vector<std::string> tokens;
    for (std::string token; stream >> token;) {
        tokens.push_back(token);
    }
    return tokens;
}
} // namespace

TextTable TextTable::read(const std::string& path) {
    std::ifstream input(path);
    if (!input) {
        throw InputError("cannot open reference table " + path);
    }
    TextTable table;
    table.path_ = path;
    std::string line;
    for (std::size_t line_number = 1; std::getline(input, line); ++line_number) {
        if (line.starts_with('#')) {
            if (table.cells_.empty()) {
                table.names_ = splitWhitespace(line.substr(1));
            }
            continue;
        }
        auto tokens = splitWhitespace(line);
        if (tokens.empty()) {
            continue;
        }
        if (tokens.size() != table.names_.size()) {
            throw InputError(path + " line " + std::to_string(line_number) + ": " +
                             std::to_string(tokens.size()) + " values, the header names " +
                             std::to_string(table.names_.size()) + " columns");
        }
        table.cells_.push_back(std::move(tokens));
        table.line_numbers_.push_back(line_number);
    }
    if (table.cells_.empty()) {
        throw InputError(path + ": no data rows");
    }
    return table;
}

std::size_t TextTable::column(const std::string& name) const {
    for (std::size_t i = 0; i < names_.size(); ++i) {
        if (names_[i] == name) {
            return i;
        }
    }
    throw InputError(path_ + ": no column '" + name + "'");
}

double TextTable::number(std::size_t row, std::size_t column) const {
    const std::string& cell = cells_[row][column];
    if (cell == "nan") {
        return std::numeric_limits<double>::quiet_NaN();
    }
    char* end = nullptr;
    const double value = std::strtod(cell.c_str(), &end);
    if (end == cell.c_str() || *end != '\0' || !std::isfinite(value)) {
        throw InputError(path_ + " line " + std::to_string(line_numbers_[row]) + ": column '" +
                         names_[column] + "' value '" + cell + "' is not a number");
    }
    return value;
}

std::vector<double> TextTable::numbers(const std::string& name) const {
    const std::size_t index = column(name);
    std::vector<double> values(rowCount());
    for (std::size_t row = 0; row < rowCount(); ++row) {
        values[row] = number(row, index);
    }
    return values;
}

} // namespace starcensus
