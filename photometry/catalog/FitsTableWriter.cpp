#include "photometry/catalog/FitsTableWriter.h"

#include "photometry/base/AtomicOutput.h"
#include "photometry/base/InputError.h"

#include <fitsio.h>

#include <algorithm>
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

// cfitsio wants non-const pointers even for data it only reads.
template <class T>
void* writable(const std::vector<T>& values, std::size_t first) {
    return const_cast<T*>(values.data() + first);
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
    long rows_per_write = 1; // rows that fit cfitsio's buffers (fits_get_rowsize)

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
    fits_get_rowsize(file_->fits, &file_->rows_per_write, &status);
    file_->check(status);
    file_->rows_per_write = std::max(1L, file_->rows_per_write);
}

FitsTableWriter::~FitsTableWriter() {
    if (file_) {
        file_->close();
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
    std::vector<char> logical;
    std::vector<char*> strings;
    // Column by column over slices that fit cfitsio's buffers: the access pattern its manual recommends
    // ("Optimizing Programs": fits_get_rowsize) so each slice is assembled in memory once.
    for (std::size_t first = 0; first < rows; first += static_cast<std::size_t>(file_->rows_per_write)) {
        const std::size_t count = std::min(rows - first, static_cast<std::size_t>(file_->rows_per_write));
        const LONGLONG first_row = rows_written_ + static_cast<LONGLONG>(first) + 1;
        for (std::size_t c = 0; c < columns_.size(); ++c) {
            int status = 0;
            const int number = static_cast<int>(c + 1);
            const auto n = static_cast<LONGLONG>(count);
            fitsfile* fits = file_->fits;
            std::visit(
                [&](const auto& values) {
                    using T = typename std::decay_t<decltype(values)>::value_type;
                    if constexpr (std::is_same_v<T, double>) {
                        fits_write_col(fits, TDOUBLE, number, first_row, 1, n, writable(values, first),
                                       &status);
                    } else if constexpr (std::is_same_v<T, float>) {
                        fits_write_col(fits, TFLOAT, number, first_row, 1, n, writable(values, first),
                                       &status);
                    } else if constexpr (std::is_same_v<T, std::int64_t>) {
                        fits_write_col(fits, TLONGLONG, number, first_row, 1, n, writable(values, first),
                                       &status);
                    } else if constexpr (std::is_same_v<T, std::int32_t>) {
                        fits_write_col(fits, TINT, number, first_row, 1, n, writable(values, first), &status);
                    } else if constexpr (std::is_same_v<T, std::int16_t>) {
                        fits_write_col(fits, TSHORT, number, first_row, 1, n, writable(values, first),
                                       &status);
                    } else if constexpr (std::is_same_v<T, std::uint8_t>) {
                        fits_write_col(fits, TBYTE, number, first_row, 1, n, writable(values, first),
                                       &status);
                    } else if constexpr (std::is_same_v<T, bool>) {
                        logical.assign(values.begin() + static_cast<std::ptrdiff_t>(first),
                                       values.begin() + static_cast<std::ptrdiff_t>(first + count));
                        fits_write_col(fits, TLOGICAL, number, first_row, 1, n, logical.data(), &status);
                    } else {
                        strings.clear();
                        for (std::size_t r = first; r < first + count; ++r) {
                            strings.push_back(const_cast<char*>(values[r].c_str()));
                        }
                        fits_write_col(fits, TSTRING, number, first_row, 1, n, strings.data(), &status);
                    }
                },
                data[c]);
            file_->check(status, columns_[c].name);
        }
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
