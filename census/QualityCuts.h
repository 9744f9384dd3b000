#pragma once
// Quality cuts applied to the candidates before membership and classification, each reported with the
// number of rows it changed.
#include "photometry/catalog/CatalogRow.h"

#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::census {

struct QualitySettings {
    // Astrometric quality: rows with RUWE above this are removed (0, the default, disables). A census
    // keeps them by default: most are unresolved binaries, real members whose removal would bias
    // densities low (about 12% of systems in the mock). Missing RUWE passes.
    double max_ruwe = 0.0;
    // Rows with RUWE above this keep their place but have their parallax error multiplied by RUWE, since
    // a poor single-star fit means the formal error understates the real one (common practice, no
    // source). 1.4 is the threshold recommended for Gaia DR2/DR3 single-star solutions (Lindegren 2018,
    // GAIA-C3-TN-LU-LL-124; from memory). 0 disables.
    double inflate_errors_above_ruwe = 1.4;
    // Rows whose parallax signal-to-noise is below this are kept as members (by probability) but not
    // classified (class `unclassified`): their absolute magnitudes are too uncertain.
    double min_parallax_snr_to_classify = 5.0;
    // Photometric quality: BP-RP is dropped (the row is classified from M_G alone, flagged lower
    // confidence) when either BP or RP error exceeds this (mag). Common practice, no source.
    double max_colour_error_mag = 0.1;
};

struct CutOutcome {
    std::string name;
    std::string description;
    std::int64_t rows_affected = 0;
};

/// Applies the cuts in place (removing or editing rows) and says what each did.
std::vector<CutOutcome> applyQualityCuts(std::vector<photometry::CatalogRow>& rows,
                                         const QualitySettings& settings);

} // namespace starcensus::census
