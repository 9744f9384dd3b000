#pragma once
// Test helpers: a mock neighbourhood seen as the completeness and luminosity-function numerics see a
// sample (census/Completeness.h SampleStar).
#include "census/Completeness.h"
#include "census/MonteCarlo.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/Classifier.h"

#include <vector>

namespace starcensus::census::testing {

using mock::MockResult;
using mock::ObjectTruth;

/// Catalogued objects with their true distance, true combined M_G and true class (weight 1).
inline std::vector<SampleStar> truthStars(const MockResult& mock) {
    std::vector<SampleStar> stars;
    for (const ObjectTruth& object : mock.truth) {
        if (object.catalogued) {
            stars.push_back({object.abs_g_mag, object.distance_pc, 1.0,
                             photometry::categoryOf(object.true_class, object.spectral_code)});
        }
    }
    return stars;
}

/// Catalogue rows as the pipeline sees them: distance 1000 / parallax, M_G and class from the exact
/// classifier, weight = membership probability within sample.radii()[radius_index].
inline std::vector<SampleStar> classifiedStars(const MockResult& mock, const PreparedSample& sample,
                                               std::size_t radius_index) {
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    std::vector<SampleStar> stars;
    for (std::size_t s = 0; s < mock.catalog.size(); ++s) {
        const photometry::CatalogRow& row = mock.catalog[s];
        if (!(row.parallax_mas > 0.0)) {
            continue;
        }
        const photometry::Classification result = classifier.classify(photometry::photometricInput(row));
        stars.push_back({result.abs_g_mag, 1000.0 / row.parallax_mas,
                         sample.probabilityWithin(s, radius_index),
                         photometry::categoryOf(result.stellar_class, result.spectral_code)});
    }
    return stars;
}

} // namespace starcensus::census::testing
