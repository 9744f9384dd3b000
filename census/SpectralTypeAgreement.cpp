#include "census/SpectralTypeAgreement.h"

#include "census/Intervals.h"

#include <cmath>

namespace starcensus::census {

std::int64_t SpectralTypeAgreement::photometricallyClassified() const {
    std::int64_t classified = 0;
    for (const auto& row : confusion) {
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            classified += static_cast<photometry::StellarClass>(c) == photometry::StellarClass::Unclassified
                              ? 0
                              : row[c];
        }
    }
    return classified;
}

std::vector<SpectralTypeAgreement> compareSpectralTypes(std::span<const photometry::CatalogRow> rows,
                                                        const PreparedSample& sample,
                                                        const photometry::Classifier& classifier,
                                                        const RowClassRules& rules, double min_probability) {
    std::vector<SpectralTypeAgreement> agreements(sample.radii().size());
    std::vector<std::vector<double>> differences(sample.radii().size());
    bool any = false;
    for (std::size_t s = 0; s < rows.size(); ++s) {
        const photometry::CatalogRow& row = rows[s];
        if (!readsLiteratureType(row, rules)) {
            continue;
        }
        any = true;
        const photometry::Classification photometric = classifyRowPhotometry(row, classifier, rules);
        const auto literature_class = static_cast<std::size_t>(row.literature_class);
        const auto photometric_class = static_cast<std::size_t>(photometric.stellar_class);
        const bool dwarfs = row.literature_class < photometry::StellarClass::WhiteDwarf &&
                            photometric.stellar_class < photometry::StellarClass::WhiteDwarf;
        const bool subtypes =
            dwarfs && std::isfinite(row.literature_code) && std::isfinite(photometric.spectral_code);
        for (std::size_t r = 0; r < agreements.size(); ++r) {
            if (!(sample.probabilityWithin(s, r) >= min_probability)) {
                continue;
            }
            SpectralTypeAgreement& agreement = agreements[r];
            ++agreement.compared;
            agreement.agreeing += literature_class == photometric_class ? 1 : 0;
            ++agreement.confusion[literature_class][photometric_class];
            if (subtypes) {
                differences[r].push_back(std::abs(photometric.spectral_code - row.literature_code));
            }
        }
    }
    if (!any) {
        return {};
    }
    for (std::size_t r = 0; r < agreements.size(); ++r) {
        agreements[r].radius_pc = sample.radii()[r];
        agreements[r].subtype_pairs = static_cast<std::int64_t>(differences[r].size());
        if (!differences[r].empty()) {
            agreements[r].median_abs_subtype_difference = sampleQuantile(differences[r], 0.5);
        }
    }
    return agreements;
}

} // namespace starcensus::census
