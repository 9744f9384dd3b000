#pragma once
// hosts.fits: the host list of one census radius for target-list and occurrence tools. One row per object
// whose membership probability within the radius is at least a threshold, with its class (the exact
// classifier, as in sample.fits), Teff and mass and their uncertainties (census/HostMeasurements.h).
#include "census/HostMeasurements.h"
#include "census/MonteCarlo.h"
#include "census/Systems.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"

#include <filesystem>
#include <span>

namespace starcensus::reports {

/// Writes the host list of `measured` (from measureHosts() with the same settings); returns the number
/// of hosts. `systems`: the run's system census, or null for a run without one (no system columns).
std::size_t writeHostTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                           const census::PreparedSample& sample, const census::DrawTallies& tallies,
                           const photometry::Classifier& classifier, const census::RowClassRules& rules,
                           const census::HostListSettings& settings, const census::HostMeasurements& measured,
                           const census::SystemCatalog* systems);

} // namespace starcensus::reports
