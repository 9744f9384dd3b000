#pragma once
// sample.fits: one row per candidate that passed the quality cuts, with the inputs used, the membership
// probability per radius, absolute magnitude and colours, the exact classification (class, subtype,
// Teff, mass, flags) and the class probabilities from the Monte Carlo.
#include "census/MonteCarlo.h"
#include "photometry/CatalogRow.h"
#include "photometry/Classifier.h"

#include <filesystem>
#include <span>

namespace starcensus::reports {

void writeSampleTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                      const census::PreparedSample& sample, const census::DrawTallies& tallies,
                      const photometry::Classifier& classifier, double min_parallax_snr_to_classify);

} // namespace starcensus::reports
