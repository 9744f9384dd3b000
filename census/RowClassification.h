#pragma once
// The exact classification of one catalogue row, as sample.fits, hosts.fits, the luminosity analysis and
// the Monte Carlo's fixed classes use it: the classifier (photometry/Classifier.h) at the parallax less the
// zero point, no photometric class for rows whose parallax signal-to-noise is too low to place them on a
// colour-magnitude diagram, and (by default) the catalogue's spectral type where it has one.
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"

#include <cstdint>
#include <optional>
#include <string_view>

namespace starcensus::census {

/// What a row's literature spectral type (the spectral_type field) does (--spectral-types).
enum class SpectralTypePolicy : std::uint8_t {
    Use,    // the literature class replaces the photometric one: a spectrum beats colours
    Check,  // photometric classes only; the literature types are compared with them
    Ignore, // the literature types are neither used nor compared
};

/// "use", "check", "ignore"; nullopt for anything else.
std::optional<SpectralTypePolicy> spectralTypePolicyFromName(std::string_view name);
std::string_view spectralTypePolicyName(SpectralTypePolicy policy);

/// The rules of classifyRow. Defaults are the census defaults (CensusOptions.h).
struct RowClassRules {
    double parallax_zero_point_mas = 0.0;      // subtracted from the catalogue parallax (mas)
    double min_parallax_snr_to_classify = 5.0; // below it: no photometric class (flag LowParallaxSnr)
    SpectralTypePolicy spectral_types = SpectralTypePolicy::Use;
};

/// The photometric classification of a row: rows with parallax / error below
/// rules.min_parallax_snr_to_classify are unclassified and flagged LowParallaxSnr. The literature type is
/// not looked at.
photometry::Classification classifyRowPhotometry(const photometry::CatalogRow& row,
                                                 const photometry::Classifier& classifier,
                                                 const RowClassRules& rules);

/// The class a census gives the row: classifyRowPhotometry(), except that under SpectralTypePolicy::Use a
/// parsed literature type sets the class and code (flag LiteratureType) whatever the parallax S/N. A
/// literature dwarf type without a subtype ("M V") takes the photometric code when its letter agrees,
/// otherwise the letter's x5; Teff and mass are the locus values at the code. Literature white dwarfs
/// keep a photometric white dwarf's Teff and mass (none otherwise); evolved stars have no code.
photometry::Classification classifyRow(const photometry::CatalogRow& row,
                                       const photometry::Classifier& classifier, const RowClassRules& rules);

/// classifyRow() from the row's classifyRowPhotometry() result, for callers that need both.
photometry::Classification applySpectralTypePolicy(photometry::Classification photometric,
                                                   const photometry::CatalogRow& row,
                                                   const photometry::Classifier& classifier,
                                                   const RowClassRules& rules);

/// True when the row has a parsed literature type the rules do not ignore: shown in sample.fits and
/// compared with the photometric class (SpectralTypeAgreement.h).
bool readsLiteratureType(const photometry::CatalogRow& row, const RowClassRules& rules);

/// True when classifyRow() takes the row's class from its literature type.
bool usesLiteratureType(const photometry::CatalogRow& row, const RowClassRules& rules);

} // namespace starcensus::census
