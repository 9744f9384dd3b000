#pragma once
// The header of an ECSV file (Enhanced Character Separated Values, the astropy convention, version 1.0;
// the format of astropy's ascii.ecsv writer and of the Gaia bulk releases): comment lines "# %ECSV 1.0",
// "# ---", then YAML (after "# ") with the column list `datatype` — name, datatype, unit, optional
// description and meta (a `ucd` there is read) — and an optional `delimiter` (one space by default, or a
// comma). Pure: parses text, reads no file.
#include "photometry/catalog/ColumnMapping.h"

#include <string>
#include <string_view>
#include <vector>

namespace starcensus::photometry {

struct EcsvHeader {
    char delimiter = ' ';
    std::vector<ColumnDescription> columns; // in order; tform holds the ECSV datatype, unit and ucd as given
};

/// True for the first line of an ECSV file ("# %ECSV " followed by a version).
bool isEcsvSignature(std::string_view first_line);

/// Parses the YAML of the header: the comment lines after the signature with their leading "# " (or "#")
/// removed, joined with '\n'. Throws InputError naming `where` for malformed YAML, a missing `datatype`
/// list, a column without a name, an unknown datatype (ECSV 1.0: bool, int8-64, uint8-64, float16-128,
/// complex64-256, string) or a delimiter other than space or comma.
EcsvHeader parseEcsvHeader(const std::string& yaml_text, const std::string& where);

} // namespace starcensus::photometry
