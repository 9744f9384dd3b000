#include "photometry/catalog/VoTableCatalog.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/InflatedBlocks.h"

#include <expat.h>

#include <algorithm>
#include <array>
#include <bit>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstring>
#include <exception>
#include <functional>
#include <optional>

namespace starcensus::photometry {

namespace {

enum class VoType : std::uint8_t {
    Boolean,
    Bit,
    UnsignedByte,
    Short,
    Int,
    Long,
    Char,
    UnicodeChar,
    Float,
    Double,
    FloatComplex,
    DoubleComplex,
};

struct VoTypeInfo {
    std::string_view name;
    VoType type;
    std::size_t bytes; // per element (bit: see elementBytes)
};

constexpr std::array<VoTypeInfo, 12> kVoTypes = {{{"boolean", VoType::Boolean, 1},
                                                  {"bit", VoType::Bit, 1},
                                                  {"unsignedByte", VoType::UnsignedByte, 1},
                                                  {"short", VoType::Short, 2},
                                                  {"int", VoType::Int, 4},
                                                  {"long", VoType::Long, 8},
                                                  {"char", VoType::Char, 1},
                                                  {"unicodeChar", VoType::UnicodeChar, 2},
                                                  {"float", VoType::Float, 4},
                                                  {"double", VoType::Double, 8},
                                                  {"floatComplex", VoType::FloatComplex, 8},
                                                  {"doubleComplex", VoType::DoubleComplex, 16}}};

struct VoField {
    ColumnDescription description;
    VoType type = VoType::Double;
    std::size_t element_bytes = 8;
    std::size_t count = 1; // elements of a fixed arraysize (product of its dimensions)
    bool variable = false; // arraysize ending in '*': a 4-byte count precedes the elements
    std::string null_text; // VALUES null, "" if none

    bool isText() const { return type == VoType::Char || type == VoType::UnicodeChar; }
    bool isNumber() const {
        return count == 1 && !variable && type != VoType::Boolean && type != VoType::Bit &&
               type != VoType::FloatComplex && type != VoType::DoubleComplex && !isText();
    }
};

/// One cell as a row callback sees it.
struct Cell {
    enum class Kind : std::uint8_t { Null, Number, Text } kind = Kind::Null;
    double number = 0.0;
    std::optional<std::int64_t> integer; // exact value of an integer cell (source_id needs all 64 bits)
    std::string text;
};

std::string_view trimmed(std::string_view text) {
    while (!text.empty() && std::isspace(static_cast<unsigned char>(text.front()))) {
        text.remove_prefix(1);
    }
    while (!text.empty() && (std::isspace(static_cast<unsigned char>(text.back())) || text.back() == '\0')) {
        text.remove_suffix(1);
    }
    return text;
}

/// A TABLEDATA cell: empty, the VALUES null or NaN is null; a scalar numeric field's text a number (an
/// integer kept exact); anything else text.
Cell cellFromText(const VoField& field, std::string_view raw) {
    Cell cell;
    const std::string_view text = trimmed(raw);
    if (text.empty() || (!field.null_text.empty() && text == field.null_text)) {
        return cell;
    }
    if (field.isNumber()) {
        if (const auto value = detail::parseCellNumber<double>(text)) {
            if (std::isnan(*value)) {
                return cell;
            }
            cell.kind = Cell::Kind::Number;
            cell.number = field.type == VoType::Float ? static_cast<float>(*value) : *value;
            cell.integer = detail::parseCellNumber<std::int64_t>(text);
            return cell;
        }
    }
    cell.kind = Cell::Kind::Text;
    cell.text = std::string(text);
    return cell;
}

template <class T>
T bigEndian(const unsigned char* bytes) {
    std::array<unsigned char, sizeof(T)> ordered;
    std::reverse_copy(bytes, bytes + sizeof(T), ordered.begin()); // VOTable binary is big-endian
    T value;
    std::memcpy(&value, ordered.data(), sizeof(T));
    return value;
}

/// A BINARY/BINARY2 cell of `count` elements at `bytes`.
Cell cellFromBinary(const VoField& field, const unsigned char* bytes, std::size_t count) {
    Cell cell;
    if (field.isText()) {
        std::string text;
        for (std::size_t i = 0; i < count; ++i) {
            // unicodeChar is UCS-2; only its ASCII range is kept (names and spectral types)
            const unsigned c =
                field.type == VoType::Char ? bytes[i] : (bytes[2 * i] == 0 ? bytes[2 * i + 1] : '?');
            if (c == 0) {
                break;
            }
            text += static_cast<char>(c);
        }
        const std::string_view kept = trimmed(text);
        if (!kept.empty()) {
            cell.kind = Cell::Kind::Text;
            cell.text = std::string(kept);
        }
        return cell;
    }
    if (!field.isNumber()) {
        return cell; // arrays, complex, bit and boolean fields are not read
    }
    std::int64_t integer = 0;
    double value = 0.0;
    switch (field.type) {
    case VoType::UnsignedByte:
        integer = bytes[0];
        break;
    case VoType::Short:
        integer = bigEndian<std::int16_t>(bytes);
        break;
    case VoType::Int:
        integer = bigEndian<std::int32_t>(bytes);
        break;
    case VoType::Long:
        integer = bigEndian<std::int64_t>(bytes);
        break;
    case VoType::Float:
        value = bigEndian<float>(bytes);
        break;
    default:
        value = bigEndian<double>(bytes);
        break;
    }
    const bool is_integer = field.type != VoType::Float && field.type != VoType::Double;
    if (is_integer) {
        if (!field.null_text.empty() && detail::parseCellNumber<std::int64_t>(field.null_text) == integer) {
            return cell;
        }
        cell.integer = integer;
        value = static_cast<double>(integer);
    } else if (std::isnan(value)) {
        return cell;
    }
    cell.kind = Cell::Kind::Number;
    cell.number = value;
    return cell;
}

/// Lines up expat on a plain or gzip file (inflated ahead in a thread of its own) and calls back with the
/// first TABLE's fields and each row.
class VoTableStream {
  public:
    using FieldsCallback = std::function<void(const std::vector<VoField>&)>;
    using RowCallback = std::function<void(const std::vector<Cell>&)>;

    VoTableStream(std::string path, FieldsCallback on_fields, RowCallback on_row)
        : path_(std::move(path)), on_fields_(std::move(on_fields)), on_row_(std::move(on_row)) {}

    void run() {
        detail::InflatedBlocks blocks(path_);
        XML_Parser parser = XML_ParserCreate(nullptr);
        XML_SetUserData(parser, this);
        XML_SetElementHandler(parser, &VoTableStream::start, &VoTableStream::end);
        XML_SetCharacterDataHandler(parser, &VoTableStream::characters);
        parser_ = parser;
        bool finished = false;
        std::string failure;
        while (!finished && failure.empty() && !error_) {
            const std::string_view block = blocks.next();
            finished = block.empty();
            if (finished && blocks.failed()) {
                failure = "damaged or truncated compressed data (" + blocks.failure() + ")";
                break;
            }
            if (XML_Parse(parser, block.data(), static_cast<int>(block.size()),
                          finished ? XML_TRUE : XML_FALSE) == XML_STATUS_ERROR &&
                !error_) {
                failure = std::string("not a well-formed VOTable (") +
                          XML_ErrorString(XML_GetErrorCode(parser)) + " at line " +
                          std::to_string(XML_GetCurrentLineNumber(parser)) + ")";
            }
        }
        XML_ParserFree(parser);
        if (error_) {
            std::rethrow_exception(error_);
        }
        if (!failure.empty()) {
            throw InputError(path_ + ": " + failure);
        }
        if (!saw_fields_) {
            throw InputError(path_ + ": no TABLE with FIELDs (not a VOTable?)");
        }
    }

  private:
    enum class Data : std::uint8_t { None, TableData, Binary, Binary2 };

    static void start(void* self, const XML_Char* name, const XML_Char** attributes) {
        static_cast<VoTableStream*>(self)->guard([&](VoTableStream& s) { s.onStart(name, attributes); });
    }
    static void end(void* self, const XML_Char* name) {
        static_cast<VoTableStream*>(self)->guard([&](VoTableStream& s) { s.onEnd(name); });
    }
    static void characters(void* self, const XML_Char* text, int length) {
        static_cast<VoTableStream*>(self)->guard([&](VoTableStream& s) {
            s.onCharacters(std::string_view(text, static_cast<std::size_t>(length)));
        });
    }
    /// Exceptions must not cross expat's C frames: kept, the parser stopped, rethrown by run().
    template <class Body>
    void guard(Body&& body) {
        if (error_) {
            return;
        }
        try {
            body(*this);
        } catch (...) {
            error_ = std::current_exception();
            XML_StopParser(parser_, XML_FALSE);
        }
    }

    static std::string_view localName(std::string_view name) {
        const auto colon = name.rfind(':');
        return colon == std::string_view::npos ? name : name.substr(colon + 1);
    }
    static std::string attribute(const XML_Char** attributes, std::string_view wanted) {
        for (std::size_t i = 0; attributes[i] != nullptr; i += 2) {
            if (localName(attributes[i]) == wanted) {
                return attributes[i + 1];
            }
        }
        return "";
    }

    void onStart(std::string_view qualified, const XML_Char** attributes) {
        const std::string_view name = localName(qualified);
        if (done_) {
            return;
        }
        if (name == "TABLE") {
            in_table_ = true;
        } else if (!in_table_) {
            return;
        } else if (name == "FIELD" && data_ == Data::None) {
            fields_.push_back(fieldFrom(attributes));
            in_field_ = true;
        } else if (name == "VALUES" && in_field_) {
            fields_.back().null_text = attribute(attributes, "null");
        } else if (name == "DATA") {
            deliverFields();
        } else if (name == "TABLEDATA") {
            deliverFields(); // also without a DATA parent: the rows need the fields first
            data_ = Data::TableData;
        } else if (name == "BINARY" || name == "BINARY2") {
            deliverFields();
            data_ = name == "BINARY" ? Data::Binary : Data::Binary2;
        } else if (name == "STREAM") {
            if (data_ != Data::Binary && data_ != Data::Binary2) {
                throw InputError(path_ + ": VOTable STREAM outside BINARY or BINARY2");
            }
            const std::string encoding = attribute(attributes, "encoding");
            if (encoding != "base64" || !attribute(attributes, "href").empty()) {
                throw InputError(path_ + ": VOTable STREAM with encoding '" + encoding +
                                 "' or an href: only inline base64 streams are read");
            }
            in_stream_ = true;
        } else if (name == "TR" && data_ == Data::TableData) {
            cells_.assign(fields_.size(), Cell{});
            column_ = 0;
            in_row_ = true;
        } else if (name == "TD" && in_row_) {
            in_cell_ = true;
            text_.clear();
        }
    }

    void onEnd(std::string_view qualified) {
        const std::string_view name = localName(qualified);
        if (done_ || !in_table_) {
            return;
        }
        if (name == "FIELD") {
            in_field_ = false;
        } else if (name == "TD" && in_cell_) {
            in_cell_ = false;
            if (column_ >= cells_.size()) {
                throw InputError(path_ + ": VOTable row " + std::to_string(rows_ + 1) +
                                 " has more cells than the " + std::to_string(fields_.size()) + " FIELDs");
            }
            cells_[column_] = cellFromText(fields_[column_], text_);
            ++column_;
        } else if (name == "TR" && in_row_) {
            in_row_ = false;
            if (column_ != fields_.size()) {
                throw InputError(path_ + ": VOTable row " + std::to_string(rows_ + 1) + " has " +
                                 std::to_string(column_) + " cells, the table " +
                                 std::to_string(fields_.size()) + " FIELDs");
            }
            ++rows_;
            on_row_(cells_);
        } else if (name == "STREAM") {
            in_stream_ = false;
            if (quad_length_ != 0 || position_ != bytes_.size()) {
                throw InputError(path_ + ": VOTable binary stream ends inside row " +
                                 std::to_string(rows_ + 1) + " (truncated or broken base64)");
            }
        } else if (name == "TABLE") {
            done_ = true; // only the first table is read
            if (!fields_.empty()) {
                deliverFields(); // a table without rows
            }
        }
    }

    /// Hands the fields to the callback once, before the first row.
    void deliverFields() {
        if (!saw_fields_) {
            saw_fields_ = true;
            on_fields_(fields_);
        }
    }

    void onCharacters(std::string_view text) {
        if (in_cell_) {
            text_ += text;
        } else if (in_stream_) {
            decodeBase64(text);
            parseBinaryRows();
        }
    }

    VoField fieldFrom(const XML_Char** attributes) const {
        VoField field;
        field.description.number = static_cast<int>(fields_.size() + 1);
        field.description.name = attribute(attributes, "name");
        field.description.ucd = attribute(attributes, "ucd");
        field.description.unit = attribute(attributes, "unit");
        const std::string datatype = attribute(attributes, "datatype");
        const auto info = std::find_if(kVoTypes.begin(), kVoTypes.end(),
                                       [&](const VoTypeInfo& t) { return t.name == datatype; });
        if (info == kVoTypes.end()) {
            throw InputError(path_ + ": VOTable FIELD " + field.description.name + " has datatype '" +
                             datatype + "', not one of VOTable 1.4's");
        }
        field.type = info->type;
        field.element_bytes = info->bytes;
        const std::string arraysize = attribute(attributes, "arraysize");
        field.description.tform = datatype + (arraysize.empty() ? "" : "[" + arraysize + "]");
        if (!arraysize.empty()) {
            field.variable = arraysize.back() == '*';
            std::size_t count = 1;
            std::size_t start = 0;
            while (start < arraysize.size()) {
                const std::size_t x = std::min(arraysize.find('x', start), arraysize.size());
                const std::string_view part = std::string_view(arraysize).substr(start, x - start);
                const std::string_view digits = part.ends_with("*") ? part.substr(0, part.size() - 1) : part;
                std::size_t n = 1;
                if (!digits.empty()) {
                    const auto [at, error] = std::from_chars(digits.data(), digits.data() + digits.size(), n);
                    if (error != std::errc{} || at != digits.data() + digits.size()) {
                        throw InputError(path_ + ": VOTable FIELD " + field.description.name +
                                         " has arraysize '" + arraysize + "'");
                    }
                }
                count *= n;
                start = x + 1;
            }
            field.count = count;
        }
        return field;
    }

    void decodeBase64(std::string_view text) {
        for (const char c : text) {
            int value = -1;
            if (c >= 'A' && c <= 'Z') {
                value = c - 'A';
            } else if (c >= 'a' && c <= 'z') {
                value = c - 'a' + 26;
            } else if (c >= '0' && c <= '9') {
                value = c - '0' + 52;
            } else if (c == '+') {
                value = 62;
            } else if (c == '/') {
                value = 63;
            } else if (c == '=') {
                padding_ = true;
                continue;
            } else if (std::isspace(static_cast<unsigned char>(c))) {
                continue;
            } else {
                throw InputError(path_ + ": VOTable binary stream has a character that is not base64 ('" +
                                 std::string(1, c) + "')");
            }
            if (padding_) {
                throw InputError(path_ + ": VOTable binary stream continues after base64 padding");
            }
            quad_ = (quad_ << 6) | static_cast<std::uint32_t>(value);
            if (++quad_length_ == 4) {
                bytes_.push_back(static_cast<char>((quad_ >> 16) & 0xff));
                bytes_.push_back(static_cast<char>((quad_ >> 8) & 0xff));
                bytes_.push_back(static_cast<char>(quad_ & 0xff));
                quad_ = 0;
                quad_length_ = 0;
            }
        }
        if (padding_ && quad_length_ > 1) { // the last, padded group: 2 chars -> 1 byte, 3 -> 2
            const std::uint32_t bits = quad_ << (6 * (4 - quad_length_));
            bytes_.push_back(static_cast<char>((bits >> 16) & 0xff));
            if (quad_length_ == 3) {
                bytes_.push_back(static_cast<char>((bits >> 8) & 0xff));
            }
            quad_ = 0;
            quad_length_ = 0;
        }
    }

    /// Decodes every complete row at the front of the decoded bytes.
    void parseBinaryRows() {
        const auto* data = reinterpret_cast<const unsigned char*>(bytes_.data());
        while (true) {
            std::size_t at = position_;
            const std::size_t flag_bytes = data_ == Data::Binary2 ? (fields_.size() + 7) / 8 : 0;
            if (bytes_.size() - at < flag_bytes) {
                break;
            }
            const unsigned char* flags = data + at;
            at += flag_bytes;
            bool complete = true;
            cells_.assign(fields_.size(), Cell{});
            for (std::size_t f = 0; f < fields_.size() && complete; ++f) {
                const VoField& field = fields_[f];
                std::size_t count = field.count;
                if (field.variable) {
                    if (bytes_.size() - at < 4) {
                        complete = false;
                        break;
                    }
                    count = static_cast<std::size_t>(bigEndian<std::uint32_t>(data + at));
                    at += 4;
                }
                const std::size_t length =
                    field.type == VoType::Bit ? (count + 7) / 8 : count * field.element_bytes;
                if (bytes_.size() - at < length) {
                    complete = false;
                    break;
                }
                const bool null_flag = flag_bytes > 0 && (flags[f / 8] & (0x80u >> (f % 8))) != 0;
                if (!null_flag) {
                    cells_[f] = cellFromBinary(field, data + at, count);
                }
                at += length;
            }
            if (!complete) {
                break;
            }
            position_ = at;
            ++rows_;
            on_row_(cells_);
        }
        if (position_ > (1u << 20)) { // keep the buffer small: drop what has been decoded
            bytes_.erase(0, position_);
            position_ = 0;
        }
    }

    std::string path_;
    FieldsCallback on_fields_;
    RowCallback on_row_;
    XML_Parser parser_ = nullptr;
    std::exception_ptr error_;
    std::vector<VoField> fields_;
    std::vector<Cell> cells_;
    std::string text_;
    std::string bytes_; // decoded binary stream not yet parsed into rows
    std::size_t position_ = 0;
    std::uint32_t quad_ = 0;
    int quad_length_ = 0;
    bool padding_ = false;
    std::size_t column_ = 0;
    std::int64_t rows_ = 0;
    Data data_ = Data::None;
    bool in_table_ = false, in_field_ = false, in_row_ = false, in_cell_ = false, in_stream_ = false,
         done_ = false, saw_fields_ = false;
};

} // namespace

bool isVoTablePath(const std::string& path) {
    return detail::endsWithAnyIgnoringCase(path, {".vot", ".votable", ".xml", ".vot.gz", ".votable.gz",
                                                  ".xml.gz", ".vot.bz2", ".votable.bz2", ".xml.bz2"});
}

namespace detail {

FileScanResult scanVoTableFile(const std::string& path, FileIndex file_index, const ScanSettings& settings) {
    FileScanResult result;
    FileScanReport& report = result.report;
    report.path = path;
    report.hdu_name = "VOTable";
    std::optional<ScanAccumulator> accumulator;
    std::vector<const ResolvedColumn*> mapped;
    const auto on_fields = [&](const std::vector<VoField>& fields) {
        std::vector<ColumnDescription> columns;
        for (const auto& field : fields) {
            columns.push_back(field.description);
        }
        report.mapping =
            resolveColumns(columns, MappingRequest{settings.user_columns, settings.user_units, false}, path);
        for (const auto& resolved : report.mapping.fields) {
            if (resolved) {
                mapped.push_back(&*resolved);
            }
        }
        accumulator.emplace(result, settings);
    };
    const auto on_row = [&](const std::vector<Cell>& cells) {
        CatalogRow row;
        row.file_index = file_index;
        row.row_index = detail::tableRowIndex(path, report.rows++);
        for (const ResolvedColumn* column : mapped) {
            const Cell& cell = cells[column->column_index];
            if (cell.kind == Cell::Kind::Null) {
                continue;
            }
            if (column->field == CatalogField::SpectralType) {
                setLiteratureType(row,
                                  cell.kind == Cell::Kind::Text ? cell.text : std::to_string(cell.number));
                continue;
            }
            const bool is_id = column->field == CatalogField::SourceId;
            if (cell.kind == Cell::Kind::Text || (is_id && !cell.integer)) {
                throw InputError(path + " row " + std::to_string(row.row_index + 1) + ": column " +
                                 column->column_name + " (" + std::string(fieldName(column->field)) + "): '" +
                                 (cell.kind == Cell::Kind::Text ? cell.text : std::to_string(cell.number)) +
                                 "' is not " + (is_id ? "an integer" : "a number"));
            }
            if (is_id) {
                row.source_id = *cell.integer;
                continue;
            }
            rowMember(column->field).set(row, canonicalValue(*column, cell.number));
        }
        accumulator->add(row);
    };
    VoTableStream(path, on_fields, on_row).run();
    accumulator->finish(path);
    if (settings.progress != nullptr) {
        settings.progress->items_done.fetch_add(report.rows, std::memory_order_relaxed);
    }
    return result;
}

TableProfile profileVoTable(const std::string& path) {
    TableProfile profile;
    profile.where = path;
    profile.hdu_name = "VOTable";
    const auto on_fields = [&](const std::vector<VoField>& fields) {
        for (const auto& field : fields) {
            ColumnProfile column;
            column.description = field.description;
            profile.columns.push_back(std::move(column));
        }
    };
    const auto on_row = [&](const std::vector<Cell>& cells) {
        ++profile.rows;
        for (std::size_t i = 0; i < cells.size(); ++i) {
            ColumnProfile& column = profile.columns[i];
            switch (cells[i].kind) {
            case Cell::Kind::Null:
                column.countNull();
                break;
            case Cell::Kind::Number:
                column.countNumber(cells[i].number);
                break;
            case Cell::Kind::Text:
                column.countText(cells[i].text);
                break;
            }
        }
    };
    VoTableStream(path, on_fields, on_row).run();
    for (auto& column : profile.columns) {
        column.settleKindFromCells();
    }
    return profile;
}

} // namespace detail

} // namespace starcensus::photometry
