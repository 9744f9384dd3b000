#pragma once
// Which table column feeds which CatalogRow field, and in what unit.
//
// Each logical field is resolved in this order, names and UCDs compared case-insensitively:
//   1. the user's mapping (--column parallax=PLX);
//   2. the column's IVOA UCD (TUCDn keyword; UCD1+ vocabulary, IVOA Recommendation "The UCD1+ controlled
//      vocabulary", version 1.5, 2023);
//   3. the column names of the large astrometric and near-infrared releases (Gaia DR3 gaia_source, 2MASS
//      PSC, and their VizieR renderings: Plx, e_Plx, Gmag, Jmag, ...).
// Two columns that match one field at the same step are ambiguous: an InputError, resolved by --column.
#include <array>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace starcensus::photometry {

enum class CatalogField : std::uint8_t {
    SourceId,
    Ra,
    Dec,
    Parallax,
    ParallaxError,
    Pmra,
    Pmdec,
    G,
    Bp,
    Rp,
    GError,
    BpError,
    RpError,
    J,
    H,
    Ks,
    Ruwe,
    JError,
    HError,
    KsError,
    B,  // Johnson B
    V,  // Johnson V
    W1, // WISE W1 (3.4 um)
    W2, // WISE W2 (4.6 um)
    BError,
    VError,
    W1Error,
    W2Error,
    // Number of components of the object's system in a literature multiplicity column (1 single, 2
    // double, ...; dimensionless): census/Systems.h flags objects whose system has more than it resolves.
    Components,
    // MK spectral type as text ("M5.5V", "L0: INT-G", "DA7.8"): the only text field; the readers parse it
    // into CatalogRow's literature_* members.
    SpectralType,
};

inline constexpr std::size_t kCatalogFieldCount = 30;
/// The logical names used by --column and --unit, in CatalogField order.
inline constexpr std::array<std::string_view, kCatalogFieldCount> kCatalogFieldNames = {
    "source_id",  "ra",           "dec",  "parallax", "parallax_error", "pmra",     "pmdec",
    "g",          "bp",           "rp",   "g_error",  "bp_error",       "rp_error", "j",
    "h",          "ks",           "ruwe", "j_error",  "h_error",        "ks_error", "b",
    "v",          "w1",           "w2",   "b_error",  "v_error",        "w1_error", "w2_error",
    "components", "spectral_type"};

constexpr std::string_view fieldName(CatalogField field) {
    return kCatalogFieldNames[static_cast<std::size_t>(field)];
}
/// Case-insensitive; nullopt for a name that is not a logical field.
std::optional<CatalogField> fieldFromName(std::string_view name);
/// "source_id ra dec ..." for messages.
std::string allFieldNames();

/// True for the one field whose values are text (spectral_type); every other field is numeric.
constexpr bool isTextField(CatalogField field) {
    return field == CatalogField::SpectralType;
}

/// The unit every value of a field is converted to: "mas", "deg", "mas/yr", "mag" or "" (dimensionless).
std::string_view canonicalUnit(CatalogField field);
/// Factor turning a value in `unit` (as written in TUNITn or --unit) into the canonical unit of `field`;
/// nullopt if the field does not accept that unit. An empty unit is accepted where a release convention
/// makes it unambiguous (deg, mas/yr, mag, dimensionless) and rejected for parallaxes.
std::optional<double> unitScale(CatalogField field, std::string_view unit);
/// The units `field` accepts, for messages ("mas, arcsec, uas").
std::string acceptedUnits(CatalogField field);

enum class MappingRoute : std::uint8_t { User, Ucd, Name };
std::string_view routeName(MappingRoute route); // "user", "UCD", "name"

/// What a table says about one of its columns.
struct ColumnDescription {
    int number = 0;    // 1-based column number (FITS TTYPEn index, CSV position)
    std::string name;  // TTYPEn or CSV header
    std::string tform; // TFORMn; empty for CSV
    std::string ucd;   // TUCDn; empty if absent
    std::string unit;  // TUNITn; empty if absent (always for CSV)
};

/// How one field was resolved.
struct ResolvedColumn {
    CatalogField field = CatalogField::SourceId;
    MappingRoute route = MappingRoute::Name;
    std::size_t column_index = 0;    // into the ColumnDescription list
    std::string column_name;         // as written in the file
    std::string matched_by;          // "--column g=PHOT_G", "UCD phot.mag;em.opt", "name phot_g_mean_mag"
    std::string unit;                // the unit the stored values are in; empty if none stated
    std::string unit_source;         // "TUNIT7", "--unit", "Gaia name (mas)", or "none"
    double scale_to_canonical = 1.0; // stored value * scale = value in canonicalUnit(field)
    // Photometric error stored as flux over its error (a signal-to-noise ratio), converted to a magnitude
    // error by canonicalValue().
    bool flux_over_error = false;
};

struct ColumnMapping {
    std::array<std::optional<ResolvedColumn>, kCatalogFieldCount> fields;

    const std::optional<ResolvedColumn>& operator[](CatalogField field) const {
        return fields[static_cast<std::size_t>(field)];
    }
};

/// What the caller adds to the file's own description of its columns.
/// The --column value that leaves a field unmapped (any case), e.g. --column source_id=none for a table
/// whose "source" column holds object names; a column named "none" cannot be chosen.
inline constexpr std::string_view kUnmappedColumn = "none";

struct MappingRequest {
    std::map<std::string, std::string> user_columns; // logical field -> column name (--column), or none
    std::map<std::string, std::string> user_units;   // logical field -> unit when the file states none
    // CSV only: a column named exactly "parallax" or "parallax_error" without a stated unit is in mas,
    // the unit of those columns by the Gaia archive's definition (Gaia DR3 documentation, datamodel of
    // gaia_source). FITS files must state TUNITn for parallaxes.
    bool gaia_names_imply_mas = false;
};

/// Resolves every field. `where` names the file (and HDU) in messages. Throws InputError for a user
/// mapping to a missing column, an ambiguous match, a missing required field (parallax, parallax_error,
/// g), a unit the field does not accept, or a parallax column without a unit.
ColumnMapping resolveColumns(const std::vector<ColumnDescription>& columns, const MappingRequest& request,
                             const std::string& where);

/// resolveColumns without stopping at the first field that fails (for inspect): each field's problem is
/// the one-line message resolveColumns would throw for it ("" if none), and that field stays unmapped.
/// resolveColumns throws the first problem in CatalogField order. Unknown field names in the request
/// still throw (they are option errors, not properties of the file).
struct MappingAttempt {
    ColumnMapping mapping;
    std::array<std::string, kCatalogFieldCount> problems;
};
MappingAttempt attemptColumns(const std::vector<ColumnDescription>& columns, const MappingRequest& request,
                              const std::string& where);

/// The fields a run cannot do without: parallax, parallax_error and g.
bool isRequiredField(CatalogField field);
/// What the mapping recognises a field by: UCDs (lower case, without meta.main unless it is part of the
/// field's UCD) and column names (lower case).
std::span<const std::string_view> knownUcds(CatalogField field);
std::span<const std::string_view> knownNames(CatalogField field);
/// A UCD as the mapping compares it for `field`: lower case, blanks and empty words dropped, meta.main
/// dropped except for source_id, ra and dec.
std::string normalisedUcd(std::string_view ucd, CatalogField field);

/// sigma_mag = 2.5 / ln(10) / (F / sigma_F): first-order error propagation of m = -2.5 log10(F)
/// (common practice, no source).
inline constexpr double kMagErrorPerInverseSnr = 1.0857362047581294;

/// A stored value (after TSCAL/TZERO) in the canonical unit of its field; NaN stays NaN, and a
/// non-positive signal-to-noise ratio is missing.
inline double canonicalValue(const ResolvedColumn& column, double stored) {
    if (column.flux_over_error) {
        return stored > 0.0 ? kMagErrorPerInverseSnr / stored : std::numeric_limits<double>::quiet_NaN();
    }
    return stored * column.scale_to_canonical;
}

} // namespace starcensus::photometry
