#include "census/RowClassification.h"

#include <array>
#include <cmath>

namespace starcensus::census {

namespace {

constexpr std::array<std::string_view, 3> kPolicyNames = {"use", "check", "ignore"};

/// Replaces the class of `photometric` with the row's literature class (see classifyRow).
photometry::Classification withLiteratureType(photometry::Classification result,
                                              const photometry::CatalogRow& row,
                                              const photometry::DwarfLocus& locus) {
    using photometry::StellarClass;
    const StellarClass photometric_class = result.stellar_class;
    const double photometric_code = result.spectral_code;
    result.stellar_class = row.literature_class;
    result.flags |= photometry::flagBit(photometry::ClassificationFlag::LiteratureType);
    if (row.literature_class == StellarClass::WhiteDwarf || row.literature_class == StellarClass::Evolved) {
        result.spectral_code = photometry::kMissing;
        if (photometric_class != row.literature_class || row.literature_class == StellarClass::Evolved) {
            result.teff_k = photometry::kMissing;
            result.mass_msun = photometry::kMissing;
        }
        return result;
    }
    const double letter_start = 10.0 * static_cast<double>(static_cast<int>(row.literature_class));
    result.spectral_code = std::isfinite(row.literature_code)          ? row.literature_code
                           : photometric_class == row.literature_class ? photometric_code
                                                                       : letter_start + 5.0;
    result.teff_k = locus.valueAtCode(photometry::LocusQuantity::TeffK, result.spectral_code);
    result.mass_msun = locus.valueAtCode(photometry::LocusQuantity::MassMsun, result.spectral_code);
    return result;
}

} // namespace

std::optional<SpectralTypePolicy> spectralTypePolicyFromName(std::string_view name) {
    for (std::size_t i = 0; i < kPolicyNames.size(); ++i) {
        if (kPolicyNames[i] == name) {
            return static_cast<SpectralTypePolicy>(i);
        }
    }
    return std::nullopt;
}

std::string_view spectralTypePolicyName(SpectralTypePolicy policy) {
    return kPolicyNames[static_cast<std::size_t>(policy)];
}

photometry::Classification classifyRowPhotometry(const photometry::CatalogRow& row,
                                                 const photometry::Classifier& classifier,
                                                 const RowClassRules& rules) {
    photometry::PhotometricInput input = photometry::photometricInput(row);
    input.parallax_mas = row.parallax_mas - rules.parallax_zero_point_mas;
    photometry::Classification result = classifier.classify(input);
    if (!(row.parallax_mas >= rules.min_parallax_snr_to_classify * row.parallax_error_mas)) {
        result.stellar_class = photometry::StellarClass::Unclassified;
        result.flags |= photometry::flagBit(photometry::ClassificationFlag::LowParallaxSnr);
    }
    return result;
}

bool readsLiteratureType(const photometry::CatalogRow& row, const RowClassRules& rules) {
    return rules.spectral_types != SpectralTypePolicy::Ignore &&
           row.literature_status == photometry::LiteratureTypeStatus::Parsed;
}

bool usesLiteratureType(const photometry::CatalogRow& row, const RowClassRules& rules) {
    return rules.spectral_types == SpectralTypePolicy::Use && readsLiteratureType(row, rules);
}

photometry::Classification classifyRow(const photometry::CatalogRow& row,
                                       const photometry::Classifier& classifier, const RowClassRules& rules) {
    return applySpectralTypePolicy(classifyRowPhotometry(row, classifier, rules), row, classifier, rules);
}

photometry::Classification applySpectralTypePolicy(photometry::Classification photometric,
                                                   const photometry::CatalogRow& row,
                                                   const photometry::Classifier& classifier,
                                                   const RowClassRules& rules) {
    return usesLiteratureType(row, rules) ? withLiteratureType(photometric, row, classifier.locus())
                                          : photometric;
}

} // namespace starcensus::census
