#pragma once
// The exact classification of one catalogue row, as sample.fits, hosts.fits and the luminosity analysis
// use it: the classifier (photometry/Classifier.h) at the parallax less the zero point, and no class for
// rows whose parallax signal-to-noise is too low to place them on a colour-magnitude diagram.
#include "census/Membership.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"

namespace starcensus::census {

/// The classification of a row: rows with parallax / error below min_parallax_snr_to_classify are
/// unclassified and flagged LowParallaxSnr.
photometry::Classification classifyRow(const photometry::CatalogRow& row,
                                       const photometry::Classifier& classifier,
                                       const MembershipSettings& membership,
                                       double min_parallax_snr_to_classify);

} // namespace starcensus::census
