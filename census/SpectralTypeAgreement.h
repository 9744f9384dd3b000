#pragma once
// How the photometric classes compare with the catalogue's spectral types (--spectral-types use or
// check): for each census radius, over the members with a parsed literature type, a confusion table of
// literature class against photometric class, the share that agree, and the typical subtype difference.
// Members are the rows whose membership probability within the radius is at least min_probability
// (0.5 by default, as for the host list).
#include "census/MonteCarlo.h"
#include "census/RowClassification.h"
#include "photometry/Classifier.h"
#include "photometry/StellarClass.h"
#include "photometry/catalog/CatalogRow.h"

#include <array>
#include <cstdint>
#include <limits>
#include <span>
#include <vector>

namespace starcensus::census {

struct SpectralTypeAgreement {
    double radius_pc = 0.0;
    std::int64_t compared = 0; // members with a parsed literature type
    std::int64_t agreeing = 0; // of those, photometric class == literature class
    // [literature class][photometric class], classes in StellarClass order
    std::array<std::array<std::int64_t, photometry::kClassCount>, photometry::kClassCount> confusion{};
    // Dwarfs with a literature subtype and a photometric one (any letters): how many, and the median of
    // |photometric code - literature code| (subtypes; 1.0 = one subtype)
    std::int64_t subtype_pairs = 0;
    double median_abs_subtype_difference = std::numeric_limits<double>::quiet_NaN();

    /// Members compared whose photometry gave a class (the photometric `unclassified` column left out).
    std::int64_t photometricallyClassified() const;
};

/// One entry per radius of the sample; empty when no row has a parsed literature type or the policy is
/// SpectralTypePolicy::Ignore. Rows are classified with classifyRowPhotometry().
std::vector<SpectralTypeAgreement> compareSpectralTypes(std::span<const photometry::CatalogRow> rows,
                                                        const PreparedSample& sample,
                                                        const photometry::Classifier& classifier,
                                                        const RowClassRules& rules,
                                                        double min_probability = 0.5);

} // namespace starcensus::census
