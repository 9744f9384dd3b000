#pragma once
// VOTable input (IVOA VOTable 1.3/1.4, the default format of archive and TAP query results), plain or
// gzip-compressed, streamed with expat: never a whole-document tree. The first TABLE is read; its FIELDs
// give name, ucd, unit, datatype and arraysize (mapped as FITS columns are: user, UCD, name), a FIELD's
// VALUES null attribute marks integer nulls. Serialisations: TABLEDATA (empty TD, NaN or the null value
// are missing), BINARY (big-endian values, NaN and the null value missing) and BINARY2 (a null-flag bit
// per field before each row). Scalars are read as numbers, char and unicodeChar arrays as text; other
// arrays, complex, bit and boolean fields are never mapped.
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/ColumnProfile.h"

#include <cstdint>
#include <string>

namespace starcensus::photometry {

/// True for names ending in ".vot", ".votable" or ".xml", also with ".gz" or ".bz2" (any case).
bool isVoTablePath(const std::string& path);

namespace detail {
/// Scans one VOTable file (see CatalogScan.h); rows get `file_index` and their 0-based row index.
FileScanResult scanVoTableFile(const std::string& path, FileIndex file_index, const ScanSettings& settings);
/// Profiles every column of the file's first TABLE (see ColumnProfile.h).
TableProfile profileVoTable(const std::string& path);
} // namespace detail

} // namespace starcensus::photometry
