#include "photometry/FitsCatalog.h"

#include "photometry/InputError.h"

#include <fitsio.h>

#include <algorithm>
#include <bit>
#include <cctype>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <optional>

namespace starcensus::photometry {

namespace {

[[noreturn]] void throwFitsError(int status, const std::string& where, const std::string& doing) {
    char text[FLEN_STATUS] = {};
    fits_get_errstatus(status, text);
    fits_clear_errmsg();
    throw InputError(where + ": " + doing + ": cfitsio status " + std::to_string(status) + " (" + text + ")");
}

// An open FITS file; `where` grows from the path to "path [HDU n NAME]" once a table is chosen.
class FitsFile {
  public:
    explicit FitsFile(const std::string& path) : where_(path) {
        std::error_code error;
        if (!std::filesystem::is_regular_file(path, error)) {
            throw InputError(path + ": no such file");
        }
        int status = 0;
        // The disk-file variant keeps '[' in names literal (no extended filename syntax); HDUs are chosen
        // with ScanSettings::hdu instead.
        if (fits_open_diskfile(&file_, path.c_str(), READONLY, &status) != 0) {
            file_ = nullptr;
            throwFitsError(status, path, "cannot open as FITS");
        }
    }
    ~FitsFile() {
        int status = 0;
        if (file_ != nullptr) {
            fits_close_file(file_, &status);
        }
    }
    FitsFile(const FitsFile&) = delete;
    FitsFile& operator=(const FitsFile&) = delete;

    fitsfile* get() const { return file_; }
    const std::string& where() const { return where_; }
    void setWhere(std::string where) { where_ = std::move(where); }

    void check(int status, const std::string& doing) const {
        if (status != 0) {
            throwFitsError(status, where_, doing);
        }
    }

    int hduCount() const {
        int count = 0;
        int status = 0;
        fits_get_num_hdus(file_, &count, &status);
        check(status, "cannot count HDUs");
        return count;
    }

    /// Moves to a 0-based HDU index and returns its type (IMAGE_HDU, ASCII_TBL, BINARY_TBL).
    int moveTo(int index) const {
        int type = 0;
        int status = 0;
        fits_movabs_hdu(file_, index + 1, &type, &status);
        check(status, "cannot move to HDU " + std::to_string(index));
        return type;
    }

    int currentIndex() const {
        int number = 0;
        fits_get_hdu_num(file_, &number);
        return number - 1;
    }

    template <class Value>
    std::optional<Value> optionalKey(const std::string& key) const {
        int status = 0;
        Value value{};
        fits_read_key(file_, dataType<Value>(), key.c_str(), &value, nullptr, &status);
        if (status == KEY_NO_EXIST || status == VALUE_UNDEFINED) {
            fits_clear_errmsg();
            return std::nullopt;
        }
        check(status, "cannot read keyword " + key);
        return value;
    }

    std::optional<std::string> optionalText(const std::string& key) const {
        int status = 0;
        char value[FLEN_VALUE] = {};
        fits_read_key(file_, TSTRING, key.c_str(), value, nullptr, &status);
        if (status == KEY_NO_EXIST || status == VALUE_UNDEFINED) {
            fits_clear_errmsg();
            return std::nullopt;
        }
        check(status, "cannot read keyword " + key);
        return std::string(value);
    }

  private:
    template <class Value>
    static int dataType() {
        if constexpr (std::is_same_v<Value, double>) {
            return TDOUBLE;
        } else {
            static_assert(std::is_same_v<Value, LONGLONG>);
            return TLONGLONG;
        }
    }

    fitsfile* file_ = nullptr;
    std::string where_;
};

std::string hduTypeName(int type) {
    switch (type) {
    case IMAGE_HDU:
        return "image";
    case ASCII_TBL:
        return "ASCII table";
    default:
        return "binary table";
    }
}

std::string hduLabel(const std::string& path, int index, const std::string& name) {
    return path + " [HDU " + std::to_string(index) + (name.empty() ? "" : " " + name) + "]";
}

bool allDigits(const std::string& text) {
    return !text.empty() &&
           std::all_of(text.begin(), text.end(), [](unsigned char c) { return std::isdigit(c); });
}

// Moves to the table the settings ask for and returns its 0-based index.
int selectTable(FitsFile& file, const std::string& hdu) {
    if (hdu.empty()) {
        const int count = file.hduCount();
        for (int index = 0; index < count; ++index) {
            if (file.moveTo(index) == BINARY_TBL) {
                return index;
            }
        }
        throw InputError(file.where() + ": no binary table HDU (" + std::to_string(count) + " HDUs)");
    }
    if (allDigits(hdu)) {
        const int index = std::stoi(hdu);
        if (index >= file.hduCount()) {
            throw InputError(file.where() + ": --hdu " + hdu + ": the file has " +
                             std::to_string(file.hduCount()) + " HDUs (0 to " +
                             std::to_string(file.hduCount() - 1) + ")");
        }
        const int type = file.moveTo(index);
        if (type != BINARY_TBL) {
            throw InputError(file.where() + ": --hdu " + hdu + " is an " + hduTypeName(type) +
                             ", not a binary table");
        }
        return index;
    }
    int status = 0;
    std::string name = hdu;
    fits_movnam_hdu(file.get(), BINARY_TBL, name.data(), 0, &status);
    if (status == BAD_HDU_NUM) {
        fits_clear_errmsg();
        throw InputError(file.where() + ": --hdu " + hdu + ": no binary table with EXTNAME " + hdu);
    }
    file.check(status, "cannot move to HDU " + hdu);
    return file.currentIndex();
}

// One column of the table: its description plus what the byte decoder needs.
struct TableColumn {
    ColumnDescription description;
    char type = 0; // TFORM letter
    long long repeat = 1;
    std::size_t offset = 0; // bytes from the row start
    std::size_t bytes = 0;
    double scale = 1.0;                 // TSCALn
    double zero = 0.0;                  // TZEROn
    std::optional<LONGLONG> null_value; // TNULLn
};

std::size_t elementBytes(char type) {
    switch (type) {
    case 'L':
    case 'A':
    case 'B':
        return 1;
    case 'I':
        return 2;
    case 'J':
    case 'E':
        return 4;
    case 'K':
    case 'D':
    case 'C':
    case 'P':
        return 8;
    case 'M':
    case 'Q':
        return 16;
    default:
        return 0;
    }
}

std::vector<TableColumn> readColumns(const FitsFile& file) {
    int count = 0;
    int status = 0;
    fits_get_num_cols(file.get(), &count, &status);
    file.check(status, "cannot read the number of columns");
    std::vector<TableColumn> columns(static_cast<std::size_t>(count));
    std::size_t offset = 0;
    for (int n = 1; n <= count; ++n) {
        const std::string suffix = std::to_string(n);
        TableColumn& column = columns[static_cast<std::size_t>(n - 1)];
        column.description.number = n;
        column.description.name = file.optionalText("TTYPE" + suffix).value_or("col" + suffix);
        column.description.tform = file.optionalText("TFORM" + suffix).value_or("");
        column.description.unit = file.optionalText("TUNIT" + suffix).value_or("");
        column.description.ucd = file.optionalText("TUCD" + suffix).value_or("");
        column.scale = file.optionalKey<double>("TSCAL" + suffix).value_or(1.0);
        column.zero = file.optionalKey<double>("TZERO" + suffix).value_or(0.0);
        column.null_value = file.optionalKey<LONGLONG>("TNULL" + suffix);

        const std::string& tform = column.description.tform;
        std::size_t position = 0;
        while (position < tform.size() && std::isdigit(static_cast<unsigned char>(tform[position]))) {
            ++position;
        }
        column.repeat = position == 0 ? 1 : std::stoll(tform.substr(0, position));
        column.type = position < tform.size()
                          ? static_cast<char>(std::toupper(static_cast<unsigned char>(tform[position])))
                          : '\0';
        if (column.type == 'X') {
            column.bytes = static_cast<std::size_t>((column.repeat + 7) / 8);
        } else if (elementBytes(column.type) != 0) {
            column.bytes = static_cast<std::size_t>(column.repeat) * elementBytes(column.type);
        } else {
            throw InputError(file.where() + ": column " + column.description.name + " has an invalid TFORM" +
                             suffix + " '" + tform + "'");
        }
        column.offset = offset;
        offset += column.bytes;
    }
    const auto row_bytes = file.optionalKey<LONGLONG>("NAXIS1").value_or(0);
    if (static_cast<std::size_t>(row_bytes) != offset) {
        throw InputError(file.where() + ": NAXIS1 = " + std::to_string(row_bytes) +
                         " does not match the column widths (" + std::to_string(offset) + " bytes)");
    }
    return columns;
}

template <class Integer>
Integer loadBigEndian(const unsigned char* bytes) {
    Integer value;
    std::memcpy(&value, bytes, sizeof value);
    if constexpr (std::endian::native == std::endian::little && sizeof(Integer) == 2) {
        value = static_cast<Integer>(__builtin_bswap16(static_cast<std::uint16_t>(value)));
    } else if constexpr (std::endian::native == std::endian::little && sizeof(Integer) == 4) {
        value = static_cast<Integer>(__builtin_bswap32(static_cast<std::uint32_t>(value)));
    } else if constexpr (std::endian::native == std::endian::little && sizeof(Integer) == 8) {
        value = static_cast<Integer>(__builtin_bswap64(static_cast<std::uint64_t>(value)));
    }
    return value;
}

// Decodes one mapped field from a raw row (FITS Standard 4.0, section 7.3: big-endian two's complement
// integers, IEEE 754 floats; physical value = TZERO + TSCAL * stored; TNULL compares the stored integer).
struct FieldDecoder {
    std::size_t offset = 0;
    char type = 0;
    double scale = 1.0;
    double zero = 0.0;
    bool has_null = false;
    std::int64_t null_value = 0;

    bool isInteger() const { return type == 'B' || type == 'I' || type == 'J' || type == 'K'; }

    std::int64_t storedInteger(const unsigned char* row) const {
        const unsigned char* at = row + offset;
        switch (type) {
        case 'B':
            return at[0];
        case 'I':
            return loadBigEndian<std::int16_t>(at);
        case 'J':
            return loadBigEndian<std::int32_t>(at);
        default:
            return loadBigEndian<std::int64_t>(at);
        }
    }

    double storedFloat(const unsigned char* row) const {
        const unsigned char* at = row + offset;
        if (type == 'E') {
            return std::bit_cast<float>(loadBigEndian<std::uint32_t>(at));
        }
        return std::bit_cast<double>(loadBigEndian<std::uint64_t>(at));
    }

    /// Physical value; NaN for a null.
    double physical(const unsigned char* row) const {
        if (isInteger()) {
            const std::int64_t stored = storedInteger(row);
            if (has_null && stored == null_value) {
                return std::numeric_limits<double>::quiet_NaN();
            }
            return zero + scale * static_cast<double>(stored);
        }
        return zero + scale * storedFloat(row);
    }

    /// Exact integer value for identifiers; kMissingSourceId for a null or a value outside int64.
    std::int64_t identifier(const unsigned char* row) const {
        constexpr double kUnsignedOffset = 9223372036854775808.0; // 2^63: TZERO of unsigned 64-bit columns
        if (isInteger() && scale == 1.0 && std::floor(zero) == zero) {
            const std::int64_t stored = storedInteger(row);
            if (has_null && stored == null_value) {
                return kMissingSourceId;
            }
            if (zero == kUnsignedOffset) {
                const std::uint64_t value = static_cast<std::uint64_t>(stored) ^ (std::uint64_t{1} << 63);
                return value > static_cast<std::uint64_t>(std::numeric_limits<std::int64_t>::max())
                           ? kMissingSourceId
                           : static_cast<std::int64_t>(value);
            }
            std::int64_t value = 0;
            if (std::fabs(zero) < 0x1p62 &&
                !__builtin_add_overflow(stored, static_cast<std::int64_t>(zero), &value) &&
                value != kMissingSourceId) {
                return value;
            }
            return kMissingSourceId;
        }
        const double value = physical(row);
        if (std::isfinite(value) && std::floor(value) == value && std::fabs(value) < 0x1p63) {
            return static_cast<std::int64_t>(value);
        }
        return kMissingSourceId;
    }
};

struct MappedDecoder {
    FieldDecoder decoder;
    const ResolvedColumn* column;
    double CatalogRow::*member;
};

FieldDecoder decoderFor(const TableColumn& column, CatalogField field, const std::string& where) {
    const std::string described =
        where + ": column " + column.description.name + " (" + std::string(fieldName(field)) + ")";
    if (column.type == 'A' || column.type == 'L' || column.type == 'X') {
        throw InputError(described + " is not numeric (TFORM " + column.description.tform + ")");
    }
    if (std::string_view("BIJKED").find(column.type) == std::string_view::npos || column.repeat != 1) {
        throw InputError(described + " has TFORM " + column.description.tform +
                         "; only scalar numeric columns (TFORM B, I, J, K, E or D, repeat 1) can be read");
    }
    FieldDecoder decoder;
    decoder.offset = column.offset;
    decoder.type = column.type;
    decoder.scale = column.scale;
    decoder.zero = column.zero;
    decoder.has_null = column.null_value.has_value() && decoder.isInteger();
    decoder.null_value = column.null_value.value_or(0);
    return decoder;
}

} // namespace

std::vector<HduSummary> listHdus(const std::string& path) {
    FitsFile file(path);
    std::vector<HduSummary> hdus;
    const int count = file.hduCount();
    for (int index = 0; index < count; ++index) {
        const int type = file.moveTo(index);
        HduSummary hdu;
        hdu.index = index;
        hdu.type = hduTypeName(type);
        hdu.name = file.optionalText("EXTNAME").value_or("");
        if (type == IMAGE_HDU) {
            const auto axes = file.optionalKey<LONGLONG>("NAXIS").value_or(0);
            for (LONGLONG axis = 1; axis <= axes; ++axis) {
                const auto length = file.optionalKey<LONGLONG>("NAXIS" + std::to_string(axis)).value_or(0);
                hdu.image_shape.append(axis == 1 ? "" : "x").append(std::to_string(length));
            }
            if (hdu.image_shape.empty()) {
                hdu.image_shape = "none";
            }
        } else {
            hdu.rows = file.optionalKey<LONGLONG>("NAXIS2").value_or(0);
            hdu.columns = static_cast<int>(file.optionalKey<LONGLONG>("TFIELDS").value_or(0));
        }
        hdus.push_back(std::move(hdu));
    }
    return hdus;
}

namespace detail {

FileScanResult scanFitsFile(const std::string& path, std::uint32_t file_index, const ScanSettings& settings) {
    FitsFile file(path);
    FileScanResult result;
    FileScanReport& report = result.report;
    report.path = path;
    report.hdu_index = selectTable(file, settings.hdu);
    report.hdu_name = file.optionalText("EXTNAME").value_or("");
    file.setWhere(hduLabel(path, report.hdu_index, report.hdu_name));

    const std::vector<TableColumn> columns = readColumns(file);
    std::vector<ColumnDescription> descriptions;
    for (const auto& column : columns) {
        descriptions.push_back(column.description);
    }
    report.mapping = resolveColumns(
        descriptions, MappingRequest{settings.user_columns, settings.user_units, false}, file.where());

    std::vector<MappedDecoder> decoders;
    std::optional<FieldDecoder> source_id;
    for (const auto& resolved : report.mapping.fields) {
        if (!resolved) {
            continue;
        }
        const FieldDecoder decoder =
            decoderFor(columns[resolved->column_index], resolved->field, file.where());
        if (resolved->field == CatalogField::SourceId) {
            source_id = decoder;
        } else {
            decoders.push_back({decoder, &*resolved, rowMember(resolved->field)});
        }
    }

    int status = 0;
    LONGLONG rows = 0;
    fits_get_num_rowsll(file.get(), &rows, &status);
    file.check(status, "cannot read the number of rows");
    report.rows = rows;
    const std::size_t row_bytes = columns.empty() ? 0 : columns.back().offset + columns.back().bytes;

    ScanAccumulator accumulator(result, settings);
    if (rows > 0 && row_bytes > 0) {
        const auto rows_per_block =
            static_cast<LONGLONG>(std::max<std::size_t>(1, settings.block_bytes / row_bytes));
        std::vector<unsigned char> block(static_cast<std::size_t>(std::min(rows_per_block, rows)) *
                                         row_bytes);
        for (LONGLONG first = 0; first < rows; first += rows_per_block) {
            const LONGLONG count = std::min(rows_per_block, rows - first);
            fits_read_tblbytes(file.get(), first + 1, 1, count * static_cast<LONGLONG>(row_bytes),
                               block.data(), &status);
            file.check(status, "cannot read rows " + std::to_string(first + 1) + " to " +
                                   std::to_string(first + count) + " (truncated file?)");
            for (LONGLONG r = 0; r < count; ++r) {
                const unsigned char* raw = block.data() + static_cast<std::size_t>(r) * row_bytes;
                CatalogRow row;
                row.file_index = file_index;
                row.row_index = first + r;
                if (source_id) {
                    row.source_id = source_id->identifier(raw);
                }
                for (const auto& mapped : decoders) {
                    row.*mapped.member = canonicalValue(*mapped.column, mapped.decoder.physical(raw));
                }
                accumulator.add(row);
            }
        }
    }
    accumulator.finish(file.where());
    return result;
}

} // namespace detail

} // namespace starcensus::photometry
