#pragma once
// Reader for the whitespace reference tables shipped in data/: '#' comment lines, of which the last one
// before the data names the columns ("#name1 name2 ..."), then one row per line. `nan` marks a missing
// number.
#include <string>
#include <vector>

namespace starcensus {

class TextTable {
  public:
    /// Throws InputError naming the file on a missing file, a missing header or a ragged row.
    static TextTable read(const std::string& path);

    std::size_t rowCount() const { return cells_.size(); }
    /// Index of a named column; throws InputError naming the file and column if absent.
    std::size_t column(const std::string& name) const;
    const std::string& text(std::size_t row, std::size_t column) const { return cells_[row][column]; }
    /// The cell as a number (`nan` gives NaN); throws InputError naming file, line and column if it is
    /// not a number.
    double number(std::size_t row, std::size_t column) const;
    /// A whole named column as numbers.
    std::vector<double> numbers(const std::string& name) const;

  private:
    std::string path_;
    std::vector<std::string> names_;
    std::vector<std::vector<std::string>> cells_;
    std::vector<std::size_t> line_numbers_;
};

} // namespace starcensus
