#pragma once
// A CSV table of tests/reference/ read whole: the header's column names and the rows' fields (split at
// commas outside double quotes), for tests that compare with published tables.
#include <doctest/doctest.h>

#include <algorithm>
#include <fstream>
#include <string>
#include <vector>

namespace starcensus::testing {

/// The fields of one CSV line, split at commas outside double quotes (the quotes dropped).
inline std::vector<std::string> splitCsv(const std::string& line) {
    std::vector<std::string> fields(1);
    bool quoted = false;
    for (const char c : line) {
        if (c == '"') {
            quoted = !quoted;
        } else if (c == ',' && !quoted) {
            fields.emplace_back();
        } else {
            fields.back() += c;
        }
    }
    return fields;
}

class ReferenceTable {
  public:
    /// Reads tests/reference/<file_name>; every row must have as many fields as the header.
    explicit ReferenceTable(const std::string& file_name) {
        std::ifstream file(STARCENSUS_SOURCE_DIR "/tests/reference/" + file_name);
        REQUIRE_MESSAGE(file, file_name);
        std::string line;
        std::getline(file, line);
        header_ = splitCsv(line);
        while (std::getline(file, line)) {
            rows_.push_back(splitCsv(line));
            REQUIRE(rows_.back().size() == header_.size());
        }
    }
    /// The index of a named column (the test fails without it).
    std::size_t column(const std::string& name) const {
        const auto it = std::find(header_.begin(), header_.end(), name);
        REQUIRE_MESSAGE(it != header_.end(), name);
        return static_cast<std::size_t>(it - header_.begin());
    }
    const std::vector<std::vector<std::string>>& rows() const { return rows_; }

  private:
    std::vector<std::string> header_;
    std::vector<std::vector<std::string>> rows_;
};

} // namespace starcensus::testing
