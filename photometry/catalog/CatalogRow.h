#pragma once
// One catalog source, reduced to what the census needs. Units are in the names; a missing value is
// NaN (floating point) or kMissingSourceId.
#include "photometry/StellarClass.h"

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

struct CatalogRow {
    std::int64_t source_id = kMissingSourceId;
    double ra_deg = kMissing;
    double dec_deg = kMissing;
    double parallax_mas = kMissing;
    double parallax_error_mas = kMissing;
    double pmra_mas_per_yr = kMissing;
    double pmdec_mas_per_yr = kMissing;
    double g_mag = kMissing;  // Gaia G (Vega)
    double bp_mag = kMissing; // Gaia G_BP
    double rp_mag = kMissing; // Gaia G_RP
    double g_error_mag = kMissing;
    double bp_error_mag = kMissing;
    double rp_error_mag = kMissing;
    double j_mag = kMissing;       // 2MASS J
    double h_mag = kMissing;       // 2MASS H
    double ks_mag = kMissing;      // 2MASS Ks
    double ruwe = kMissing;        // renormalised unit weight error (dimensionless)
    double j_error_mag = kMissing; // 2MASS J, H, Ks uncertainties (mag)
    double h_error_mag = kMissing;
    double ks_error_mag = kMissing;
    double b_mag = kMissing;  // Johnson B (Vega)
    double v_mag = kMissing;  // Johnson V (Vega)
    double w1_mag = kMissing; // WISE W1, 3.4 um (Vega)
    double w2_mag = kMissing; // WISE W2, 4.6 um (Vega)
    double b_error_mag = kMissing;
    double v_error_mag = kMissing;
    double w1_error_mag = kMissing;
    double w2_error_mag = kMissing;
    // Components of the object's system in the catalogue's multiplicity column (components field; 1
    // single, 2 double, ...; dimensionless), NaN without one.
    double literature_components = kMissing;
    // The catalogue's spectral type (spectral_type field), parsed at read time by parseLiteratureType()
    // (photometry/SpectralType.h) so the row stays plain numbers. literature_code is the parser's spectral
    // code (O0 = 0 ... M0 = 60 ... Y0 = 90; dimensionless), NaN when absent or refused, without a subtype
    // ("M V"), and for white dwarfs; literature_class is Unclassified unless Parsed, Evolved for luminosity
    // classes I-IV (a range such as "G8IV-V" is read as V), otherwise the type's letter or WD.
    double literature_code = kMissing;
    StellarClass literature_class = StellarClass::Unclassified;
    LiteratureTypeStatus literature_status = LiteratureTypeStatus::Absent;
    std::uint32_t file_index = 0; // which input file the row came from
    std::int64_t row_index = 0;   // 0-based row within that file's table
};

} // namespace starcensus::photometry
