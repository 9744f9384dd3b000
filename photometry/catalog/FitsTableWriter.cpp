#include "photometry/catalog/FitsTableWriter.h"

#include "photometry/base/AtomicOutput.h"
#include "photometry/base/InputError.h"

#include <fitsio.h>

#include <algorithm>
#include <bit>
#include <cstring>
#include <set>
#include <stdexcept>

namespace starcensus::photometry {

namespace {

// cfitsio's status text followed by its error-message stack, on one line.
std::string cfitsioMessage(int status) {
    char text[FLEN_STATUS] = {};
    fits_get_errstatus(status, text);
    std::string message = text;
    char stacked[FLEN_ERRMSG] = {};
    while (fits_read_errmsg(stacked) != 0) {
        message += std::string("; ") + stacked;
    }
    return message;
}

std::string tform(const FitsColumn& column) {
    switch (column.type) {
    case FitsColumnType::Float64:
        return "1D";
    case FitsColumnType::Float32:
        return "1E";
    case FitsColumnType::Int64:
        return "1K";
    case FitsColumnType::Int32:
        return "1J";
    case FitsColumnType::Int16:
        return "1I";
    case FitsColumnType::UInt8:
        return "1B";
    case FitsColumnType::Logical:
        return "1L";
    case FitsColumnType::String:
        return std::to_string(column.string_width) + "A";
    }
    throw std::invalid_argument("unknown FITS column type");
}

bool isInteger(FitsColumnType type) {
    return type == FitsColumnType::Int64 || type == FitsColumnType::Int32 || type == FitsColumnType::Int16 ||
           type == FitsColumnType::UInt8;
}

void checkLayout(const std::vector<FitsColumn>& columns) {
    if (columns.empty()) {
        throw std::invalid_argument("a FITS table needs at least one column");
    }
    std::set<std::string> names;
    for (const FitsColumn& column : columns) {
        if (column.name.empty() || !names.insert(column.name).second) {
            throw std::invalid_argument("FITS column name '" + column.name + "' is empty or repeated");
        }
        if (column.type == FitsColumnType::String && column.string_width <= 0) {
            throw std::invalid_argument("FITS string column '" + column.name + "' needs a positive width");
        }
        if (column.integer_null && !isInteger(column.type)) {
            throw std::invalid_argument("TNULL given for non-integer FITS column '" + column.name + "'");
        }
    }
}

FitsColumnData emptyData(FitsColumnType type) {
    switch (type) {
    case FitsColumnType::Float64:
        return std::vector<double>{};
    case FitsColumnType::Float32:
        return std::vector<float>{};
    case FitsColumnType::Int64:
        return std::vector<std::int64_t>{};
    case FitsColumnType::Int32:
        return std::vector<std::int32_t>{};
    case FitsColumnType::Int16:
        return std::vector<std::int16_t>{};
    case FitsColumnType::UInt8:
        return std::vector<std::uint8_t>{};
    case FitsColumnType::Logical:
        return std::vector<bool>{};
    case FitsColumnType::String:
        return std::vector<std::string>{};
    }
    throw std::invalid_argument("unknown FITS column type");
}

// A number as the table stores it: big-endian IEEE 754 or two's complement (FITS Standard 4.0, 5.2 and 7.3).
template <class T>
void storeBigEndian(unsigned char* out, T value) {
    static_assert(std::endian::native == std::endian::little || std::endian::native == std::endian::big);
    unsigned char bytes[sizeof(T)];
    std::memcpy(bytes, &value, sizeof(T));
    if constexpr (std::endian::native == std::endian::little) {
        std::reverse(bytes, bytes + sizeof(T));
    }
    std::memcpy(out, bytes, sizeof(T));
}

// One column's values [first, first + count) into rows of row_bytes bytes, at byte `offset` of each row.
// Strings are cut at the width and padded with blanks, logicals are 'T' or 'F': what cfitsio's
// fits_write_col writes (putcols.c, putcoll.c), so the files are the same byte for byte.
void storeColumn(const FitsColumnData& data, const FitsColumn& column, std::size_t first, std::size_t count,
                 unsigned char* rows, std::size_t row_bytes, std::size_t offset) {
    std::visit(
        [&](const auto& values) {
            using T = typename std::decay_t<decltype(values)>::value_type;
            unsigned char* out = rows + offset;
            for (std::size_t r = first; r < first + count; ++r, out += row_bytes) {
                if constexpr (std::is_same_v<T, bool>) {
                    *out = values[r] ? 'T' : 'F';
                } else if constexpr (std::is_same_v<T, std::string>) {
                    const auto width = static_cast<std::size_t>(column.string_width);
                    const std::size_t length = std::min(width, std::strlen(values[r].c_str()));
                    std::memcpy(out, values[r].data(), length);
                    std::memset(out + length, ' ', width - length);
                } else {
                    storeBigEndian(out, values[r]);
                }
            }
        },
        data);
}

} // namespace

FitsRowBlock::FitsRowBlock(const std::vector<FitsColumn>& columns) {
    columns_.reserve(columns.size());
    for (const FitsColumn& column : columns) {
        columns_.push_back(emptyData(column.type));
    }
}

std::size_t FitsRowBlock::rowCount() const {
    std::size_t rows = 0;
    for (std::size_t i = 0; i < columns_.size(); ++i) {
        const std::size_t size = std::visit([](const auto& values) { return values.size(); }, columns_[i]);
        if (i == 0) {
            rows = size;
        } else if (size != rows) {
            throw std::invalid_argument("FITS row block: column " + std::to_string(i + 1) + " has " +
                                        std::to_string(size) + " rows, column 1 has " + std::to_string(rows));
        }
    }
    return rows;
}

void FitsRowBlock::clear() {
    for (FitsColumnData& column : columns_) {
        std::visit([](auto& values) { values.clear(); }, column);
    }
}

struct FitsTableWriter::File {
    explicit File(const std::filesystem::path& path) : output(path) {}
    AtomicOutput output;
    fitsfile* fits = nullptr;
    std::vector<std::size_t> offsets; // each column's first byte in a row
    std::size_t row_bytes = 0;        // NAXIS1
    std::vector<unsigned char> rows;  // rows being assembled for one write

    void close() {
        if (fits != nullptr) {
            int ignored = 0;
            fits_close_file(fits, &ignored);
            fits = nullptr;
        }
    }
    // Throws InputError naming the file, and the column if there is one, when status is set.
    void check(int status, const std::string& column = {}) const {
        if (status != 0) {
            const std::string where = column.empty() ? "" : ", column '" + column + "'";
            throw InputError("cannot write FITS table " + output.finalPath().string() + where + ": " +
                             cfitsioMessage(status));
        }
    }
};

FitsTableWriter::FitsTableWriter(const std::filesystem::path& path, const std::string& extension_name,
                                 std::vector<FitsColumn> columns, const std::vector<FitsKeyword>& keywords)
    : columns_(std::move(columns)), file_(std::make_unique<File>(path)) {
    checkLayout(columns_);
    int status = 0;
    // The disk-file variant takes the name literally (no extended file-name syntax such as "[1]").
    fits_create_diskfile(&file_->fits, file_->output.temporaryPath().c_str(), &status);
    file_->check(status);

    std::vector<std::string> forms;
    std::vector<char*> names, types, units;
    for (FitsColumn& column : columns_) {
        forms.push_back(tform(column));
    }
    for (std::size_t i = 0; i < columns_.size(); ++i) {
        names.push_back(columns_[i].name.data());
        types.push_back(forms[i].data());
        units.push_back(columns_[i].unit.data());
    }
    std::string extname = extension_name;
    // An empty primary HDU is created first by cfitsio because the file is empty.
    fits_create_tbl(file_->fits, BINARY_TBL, 0, static_cast<int>(columns_.size()), names.data(), types.data(),
                    units.data(), extname.data(), &status);
    file_->check(status);

    for (std::size_t i = 0; i < columns_.size(); ++i) {
        const FitsColumn& column = columns_[i];
        const std::string n = std::to_string(i + 1);
        if (!column.ucd.empty()) {
            fits_write_key_str(file_->fits, ("TUCD" + n).c_str(), column.ucd.c_str(), "IVOA UCD", &status);
        }
        if (!column.description.empty()) {
            fits_modify_comment(file_->fits, ("TTYPE" + n).c_str(), column.description.c_str(), &status);
            fits_write_key_longstr(file_->fits, ("TCOMM" + n).c_str(), column.description.c_str(), "",
                                   &status);
        }
        if (column.integer_null) {
            fits_write_key_lng(file_->fits, ("TNULL" + n).c_str(),
                               static_cast<LONGLONG>(*column.integer_null), "value for missing data",
                               &status);
        }
        file_->check(status, column.name);
    }
    for (const FitsKeyword& keyword : keywords) {
        const char* name = keyword.name.c_str();
        const char* comment = keyword.comment.c_str();
        if (const auto* text = std::get_if<std::string>(&keyword.value)) {
            fits_write_key_longstr(file_->fits, name, text->c_str(), comment, &status);
        } else if (const auto* real = std::get_if<double>(&keyword.value)) {
            fits_write_key_dbl(file_->fits, name, *real, -15, comment, &status);
        } else {
            fits_write_key_lng(file_->fits, name,
                               static_cast<LONGLONG>(std::get<std::int64_t>(keyword.value)), comment,
                               &status);
        }
        file_->check(status, "keyword " + keyword.name);
    }
    // Refresh the HDU structure so the TNULLn keywords above take effect.
    fits_set_hdustruc(file_->fits, &status);
    file_->check(status);
    // Each column's bytes in a row, as cfitsio laid out the TFORMs above: repeat x element width, a
    // string's repeat being its characters.
    for (std::size_t i = 0; i < columns_.size(); ++i) {
        int type_code = 0;
        long repeat = 0;
        long width = 0;
        fits_get_coltype(file_->fits, static_cast<int>(i + 1), &type_code, &repeat, &width, &status);
        file_->check(status, columns_[i].name);
        file_->offsets.push_back(file_->row_bytes);
        file_->row_bytes += static_cast<std::size_t>(type_code == TSTRING ? repeat : repeat * width);
    }
}

FitsTableWriter::~FitsTableWriter() {
    if (file_) {
        file_->close();
    }
}

void FitsTableWriter::appendIfFull(FitsRowBlock& block, std::size_t rows_added) {
    if (rows_added % kBlockRows == 0) {
        append(block);
        block.clear();
    }
}

void FitsTableWriter::append(const FitsRowBlock& block) {
    if (!file_ || file_->fits == nullptr) {
        throw std::logic_error("FitsTableWriter::append after finish()");
    }
    const auto& data = block.columns();
    if (data.size() != columns_.size()) {
        throw std::invalid_argument("FITS row block has " + std::to_string(data.size()) +
                                    " columns, table has " + std::to_string(columns_.size()));
    }
    for (std::size_t c = 0; c < columns_.size(); ++c) {
        if (data[c].index() != static_cast<std::size_t>(columns_[c].type)) {
            throw std::invalid_argument("FITS row block: wrong value type for column '" + columns_[c].name +
                                        "'");
        }
    }
    const std::size_t rows = block.rowCount();
    // Whole rows in the table's byte layout, ~1 MiB at a time, each written with one
    // fits_write_tblbytes: one pass over the output, instead of cfitsio's strided pass per column.
    const std::size_t row_bytes = file_->row_bytes;
    const std::size_t rows_per_write = std::max<std::size_t>(1, (std::size_t{1} << 20) / row_bytes);
    for (std::size_t first = 0; first < rows; first += rows_per_write) {
        const std::size_t count = std::min(rows - first, rows_per_write);
        file_->rows.resize(count * row_bytes);
        for (std::size_t c = 0; c < columns_.size(); ++c) {
            storeColumn(data[c], columns_[c], first, count, file_->rows.data(), row_bytes, file_->offsets[c]);
        }
        int status = 0;
        fits_write_tblbytes(file_->fits, rows_written_ + static_cast<LONGLONG>(first) + 1, 1,
                            static_cast<LONGLONG>(count * row_bytes), file_->rows.data(), &status);
        file_->check(status);
    }
    rows_written_ += static_cast<std::int64_t>(rows);
}

void FitsTableWriter::finish() {
    if (!file_ || file_->fits == nullptr) {
        throw std::logic_error("FitsTableWriter::finish called twice");
    }
    int status = 0;
    fits_close_file(file_->fits, &status);
    file_->fits = nullptr;
    file_->check(status);
    file_->output.commit();
}

} // namespace starcensus::photometry
