#pragma once
// One catalog source, reduced to what the census needs. Units are in the names; a missing value is
// NaN (floating point) or kMissingSourceId.
#include "photometry/StellarClass.h"

#include <cstddef>
#include <cstdint>
#include <limits>

namespace starcensus::photometry {

/// What became of a row's literature spectral type (the spectral_type field).
enum class LiteratureTypeStatus : std::uint8_t {
    Absent,  // no column, or a blank or missing marker ("", "NaN", "--"): a null
    Parsed,  // read by parseLiteratureType(); literature_class is set
    Refused, // a string the parser did not understand: data, counted, not an error
};

inline constexpr std::int64_t kMissingSourceId = std::numeric_limits<std::int64_t>::min();
inline constexpr double kMissing = std::numeric_limits<double>::quiet_NaN();

inline constexpr float kMissingFloat = std::numeric_limits<float>::quiet_NaN();

/// A row's input file (0-based, in the order given) and its 0-based row in that file's table, in the
/// widths that keep CatalogRow at 152 bytes: the scans refuse more files, or longer tables, than these
/// hold (Gaia DR3's whole gaia_source, 1.8 billion rows, fits one table; from memory).
using FileIndex = std::uint16_t;
using RowIndex = std::uint32_t;
inline constexpr std::size_t kMaxInputFiles = std::size_t{std::numeric_limits<FileIndex>::max()} + 1;
inline constexpr std::int64_t kMaxTableRows = std::int64_t{std::numeric_limits<RowIndex>::max()} + 1;

// Positions, parallaxes and parallax errors are doubles (quality cuts rescale the errors). Everything else
// is a float: the magnitudes, their errors, RUWE and the literature fields are what the archives publish as
// 4-byte floats (Gaia DR3, 2MASS and AllWISE, from memory), so such a column is held exactly; the proper
// motions and the Gaia band errors (which the readers derive from flux-over-error ratios) are rounded to
// the nearest float, at most 2^-24 relative: 6e-4 mas/yr at Barnard's star's 10.4 arcsec/yr, far below
// any measured error. A row takes 152 bytes instead of 256, on the census's largest table (one row per
// candidate).
struct CatalogRow {
    std::int64_t source_id = kMissingSourceId;
    double ra_deg = kMissing;
    double dec_deg = kMissing;
    double parallax_mas = kMissing;
    double parallax_error_mas = kMissing; // doubles: quality cuts and --parallax-error-scale rescale it
    float pmra_mas_per_yr = kMissingFloat;
    float pmdec_mas_per_yr = kMissingFloat;
    float g_error_mag = kMissingFloat; // Gaia G, G_BP, G_RP uncertainties (mag)
    float bp_error_mag = kMissingFloat;
    float rp_error_mag = kMissingFloat;
    float g_mag = kMissingFloat;       // Gaia G (Vega)
    float bp_mag = kMissingFloat;      // Gaia G_BP
    float rp_mag = kMissingFloat;      // Gaia G_RP
    float j_mag = kMissingFloat;       // 2MASS J
    float h_mag = kMissingFloat;       // 2MASS H
    float ks_mag = kMissingFloat;      // 2MASS Ks
    float ruwe = kMissingFloat;        // renormalised unit weight error (dimensionless)
    float j_error_mag = kMissingFloat; // 2MASS J, H, Ks uncertainties (mag)
    float h_error_mag = kMissingFloat;
    float ks_error_mag = kMissingFloat;
    float b_mag = kMissingFloat;  // Johnson B (Vega)
    float v_mag = kMissingFloat;  // Johnson V (Vega)
    float w1_mag = kMissingFloat; // WISE W1, 3.4 um (Vega)
    float w2_mag = kMissingFloat; // WISE W2, 4.6 um (Vega)
    float b_error_mag = kMissingFloat;
    float v_error_mag = kMissingFloat;
    float w1_error_mag = kMissingFloat;
    float w2_error_mag = kMissingFloat;
    // Components of the object's system in the catalogue's multiplicity column (components field; 1
    // single, 2 double, ...; dimensionless), NaN without one.
    float literature_components = kMissingFloat;
    // The catalogue's spectral type (spectral_type field), parsed at read time by parseLiteratureType()
    // (photometry/SpectralType.h) so the row stays plain numbers. literature_code is the parser's spectral
    // code (O0 = 0 ... M0 = 60 ... Y0 = 90, in steps of at least 0.1 that a float holds to 1e-5;
    // dimensionless), NaN when absent or refused, without a subtype ("M V"), and for white dwarfs;
    // literature_class is Unclassified unless Parsed, Evolved for luminosity classes I-IV (a range such as
    // "G8IV-V" is read as V), otherwise the type's letter or WD.
    float literature_code = kMissingFloat;
    RowIndex row_index = 0;   // 0-based row within that file's table
    FileIndex file_index = 0; // which input file the row came from
    StellarClass literature_class = StellarClass::Unclassified;
    LiteratureTypeStatus literature_status = LiteratureTypeStatus::Absent;
};
static_assert(sizeof(CatalogRow) == 152, "CatalogRow's member order packs it into 152 bytes");

/// A floating-point member of CatalogRow, of either width, read and written as a double (a float member
/// stores the nearest float). Empty for the fields that are not numbers (source_id, spectral_type).
class RowMember {
  public:
    constexpr RowMember() = default;
    constexpr RowMember(double CatalogRow::*member) : wide_(member) {}
    constexpr RowMember(float CatalogRow::*member) : narrow_(member) {}

    constexpr explicit operator bool() const { return wide_ != nullptr || narrow_ != nullptr; }
    constexpr bool isFloat() const { return narrow_ != nullptr; }
    double get(const CatalogRow& row) const { return wide_ != nullptr ? row.*wide_ : row.*narrow_; }
    void set(CatalogRow& row, double value) const {
        if (wide_ != nullptr) {
            row.*wide_ = value;
        } else {
            row.*narrow_ = static_cast<float>(value);
        }
    }

  private:
    double CatalogRow::*wide_ = nullptr;
    float CatalogRow::*narrow_ = nullptr;
};

} // namespace starcensus::photometry
