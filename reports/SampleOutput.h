#pragma once
// sample.fits: one row per candidate that passed the quality cuts, with the inputs used, the membership
// probability per radius, absolute magnitude and colours, the exact classification (class, subtype,
// Teff, mass, flags), the class probabilities from the Monte Carlo and the object's system (id, role,
// flags; reports/SystemsOutput.h).
#include "census/MonteCarlo.h"
#include "census/RowClassification.h"
#include "census/Systems.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"
#include "photometry/catalog/FitsTableWriter.h"

#include <filesystem>
#include <span>
#include <string>
#include <vector>

namespace starcensus::reports {

/// The leading columns of sample.fits and hosts.fits: source_id, file_index, row_index, ra, dec, parallax
/// and parallax_error, and the values of a row for them (`column` is advanced past them).
std::vector<photometry::FitsColumn> rowIdentityColumns();
void appendRowIdentity(photometry::FitsRowBlock& block, std::size_t& column,
                       const photometry::CatalogRow& row);

/// The sample.fits spectral_type of a classification: the subtype label of a dwarf, empty otherwise.
std::string spectralTypeColumn(const photometry::Classification& result);

/// "%g" of a radius with '.' as 'p', for column names: 10 -> "10", 2.5 -> "2p5".
std::string radiusLabel(double radius_pc);

/// `systems`: the run's system census, or null for a run without one (no system columns).
void writeSampleTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                      const census::PreparedSample& sample, const census::DrawTallies& tallies,
                      const photometry::Classifier& classifier, const census::RowClassRules& rules,
                      const census::SystemCatalog* systems);

} // namespace starcensus::reports
