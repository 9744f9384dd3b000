#include "photometry/catalog/EcsvHeader.h"

#include "photometry/base/InputError.h"

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <array>

namespace starcensus::photometry {

namespace {

// The datatypes of the ECSV 1.0 standard (astropy APE 6).
constexpr std::array<std::string_view, 18> kDatatypes = {
    "bool",    "int8",    "int16",   "int32",    "int64",     "uint8",      "uint16",     "uint32", "uint64",
    "float16", "float32", "float64", "float128", "complex64", "complex128", "complex256", "string", "object"};

std::string scalarOr(const YAML::Node& node, const char* key, const std::string& fallback) {
    const YAML::Node value = node[key];
    return value && value.IsScalar() ? value.as<std::string>() : fallback;
}

/// meta.ucd of a column: astropy writes meta as an ordered map (!!omap, a sequence of one-key maps);
/// a plain map is read too.
std::string ucdOf(const YAML::Node& meta) {
    if (meta && meta.IsMap()) {
        return scalarOr(meta, "ucd", "");
    }
    if (meta && meta.IsSequence()) {
        for (const YAML::Node& item : meta) {
            if (item.IsMap() && item["ucd"]) {
                return scalarOr(item, "ucd", "");
            }
        }
    }
    return "";
}

} // namespace

bool isEcsvSignature(std::string_view first_line) {
    return first_line.starts_with("# %ECSV ");
}

EcsvHeader parseEcsvHeader(const std::string& yaml_text, const std::string& where) {
    YAML::Node root;
    try {
        root = YAML::Load(yaml_text);
    } catch (const YAML::Exception& error) {
        throw InputError(where + ": ECSV header is not valid YAML (" + error.msg + ", line " +
                         std::to_string(error.mark.line + 1) + " of the header)");
    }
    if (!root.IsMap() || !root["datatype"] || !root["datatype"].IsSequence()) {
        throw InputError(where + ": ECSV header has no 'datatype' list of columns");
    }
    EcsvHeader header;
    const std::string delimiter = scalarOr(root, "delimiter", " ");
    if (delimiter != " " && delimiter != ",") {
        throw InputError(where + ": ECSV delimiter '" + delimiter + "' is neither a space nor a comma");
    }
    header.delimiter = delimiter.front();
    int number = 0;
    for (const YAML::Node& column : root["datatype"]) {
        ++number;
        const std::string name = column.IsMap() ? scalarOr(column, "name", "") : "";
        if (name.empty()) {
            throw InputError(where + ": ECSV column " + std::to_string(number) + " has no name");
        }
        const std::string datatype = scalarOr(column, "datatype", "");
        if (std::find(kDatatypes.begin(), kDatatypes.end(), datatype) == kDatatypes.end()) {
            throw InputError(where + ": ECSV column " + name + " has datatype '" + datatype +
                             "', not one of ECSV 1.0's");
        }
        header.columns.push_back(
            {number, name, datatype, ucdOf(column["meta"]), scalarOr(column, "unit", "")});
    }
    return header;
}

} // namespace starcensus::photometry
