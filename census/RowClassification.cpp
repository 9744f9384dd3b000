#include "census/RowClassification.h"

namespace starcensus::census {

photometry::Classification classifyRow(const photometry::CatalogRow& row,
                                       const photometry::Classifier& classifier,
                                       const MembershipSettings& membership,
                                       double min_parallax_snr_to_classify) {
    photometry::PhotometricInput input = photometry::photometricInput(row);
    input.parallax_mas = row.parallax_mas - membership.parallax_zero_point_mas;
    photometry::Classification result = classifier.classify(input);
    if (!(row.parallax_mas >= min_parallax_snr_to_classify * row.parallax_error_mas)) {
        result.stellar_class = photometry::StellarClass::Unclassified;
        result.flags |= photometry::flagBit(photometry::ClassificationFlag::LowParallaxSnr);
    }
    return result;
}

} // namespace starcensus::census
