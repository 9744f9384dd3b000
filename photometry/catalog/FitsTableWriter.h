#pragma once
// Writes one FITS binary table (a BINTABLE extension after an empty primary HDU; FITS Standard 4.0,
// section 7.3) through cfitsio, block by block, so tables of any length are written in bounded memory.
// Each column carries its unit (TUNITn), its IVOA Unified Content Descriptor (TUCDn; IVOA UCD 1+
// Recommendation) and a one-line description (TCOMMn, also used as the TTYPEn comment). The file
// appears under its final name only after finish() succeeds (starcensus::AtomicOutput).
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <variant>
#include <vector>

namespace starcensus::photometry {

/// Column types; the order matches FitsColumnData's alternatives.
enum class FitsColumnType : std::uint8_t {
    Float64, // TFORM D
    Float32, // TFORM E
    Int64,   // TFORM K
    Int32,   // TFORM J
    Int16,   // TFORM I
    UInt8,   // TFORM B
    Logical, // TFORM L
    String,  // TFORM wA (fixed width)
};

/// The values of one column for a block of rows.
using FitsColumnData = std::variant<std::vector<double>, std::vector<float>, std::vector<std::int64_t>,
                                    std::vector<std::int32_t>, std::vector<std::int16_t>,
                                    std::vector<std::uint8_t>, std::vector<bool>, std::vector<std::string>>;

struct FitsColumn {
    std::string name; // TTYPEn
    FitsColumnType type = FitsColumnType::Float64;
    std::string unit;        // TUNITn (FITS Standard 4.0 section 4.3 unit strings); empty: none written
    std::string ucd;         // TUCDn; empty: none written
    std::string description; // TCOMMn; empty: none written
    int string_width = 0;    // characters per value, String columns only (longer values are cut)
    /// TNULLn for integer columns: the stored value that means "missing". Floating-point columns use NaN.
    std::optional<std::int64_t> integer_null;
};

/// A provenance header keyword of the table HDU (name up to 8 characters, FITS Standard 4.0 section 4.1).
struct FitsKeyword {
    std::string name;
    std::variant<std::string, double, std::int64_t> value;
    std::string comment;
};

/// Rows to append: one vector per column, of the column's type, all of the same length.
class FitsRowBlock {
  public:
    explicit FitsRowBlock(const std::vector<FitsColumn>& columns);

    /// The values of column `index`; T must be the column's element type (std::bad_variant_access if not).
    template <class T>
    std::vector<T>& values(std::size_t index) {
        return std::get<std::vector<T>>(columns_.at(index));
    }
    const std::vector<FitsColumnData>& columns() const { return columns_; }
    /// Rows in the block; std::invalid_argument if the columns differ in length.
    std::size_t rowCount() const;
    /// Empties every column, keeping the allocated capacity for the next block.
    void clear();

  private:
    std::vector<FitsColumnData> columns_;
};

class FitsTableWriter {
  public:
    /// Creates the table (zero rows) under a temporary name beside `path`. Throws InputError naming the
    /// file (and column) on a cfitsio failure, std::invalid_argument on an inconsistent column list.
    FitsTableWriter(const std::filesystem::path& path, const std::string& extension_name,
                    std::vector<FitsColumn> columns, const std::vector<FitsKeyword>& keywords = {});
    ~FitsTableWriter(); // without finish(): closes and removes the temporary file
    FitsTableWriter(const FitsTableWriter&) = delete;
    FitsTableWriter& operator=(const FitsTableWriter&) = delete;

    const std::vector<FitsColumn>& columns() const { return columns_; }
    /// An empty block laid out for this table.
    FitsRowBlock makeBlock() const { return FitsRowBlock(columns_); }

    /// Appends the block's rows. Throws InputError (file, column, cfitsio's message) on a write failure,
    /// std::invalid_argument if the block does not match the column layout.
    void append(const FitsRowBlock& block);
    /// Rows a caller that adds one row at a time keeps in its block (~0.3 MB of cells for sample.fits's 44
    /// columns): the table's memory, whatever its length. 8,192 wrote no faster and held 2 MB more at the
    /// census's peak (2,048: 0.6 MB more).
    static constexpr std::size_t kBlockRows = 1024;
    /// For such a caller, after its rows_added-th row: appends and clears the block when it holds
    /// kBlockRows rows. The caller appends the rest before finish().
    void appendIfFull(FitsRowBlock& block, std::size_t rows_added);
    std::int64_t rowCount() const { return rows_written_; }

    /// Closes the file and moves it to its final name.
    void finish();

  private:
    struct File;
    std::vector<FitsColumn> columns_;
    std::unique_ptr<File> file_;
    std::int64_t rows_written_ = 0;
};

} // namespace starcensus::photometry
