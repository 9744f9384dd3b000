#pragma once
// systems.fits (one row per system: id, members, primary, widest separation, chance-alignment
// probability, flags), the per-member system columns of sample.fits and hosts.fits, and the "systems"
// sections of fractions.json and priors.json. Layout in README.md (Outputs).
#include "census/SystemFractions.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"
#include "photometry/catalog/FitsTableWriter.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <span>
#include <string_view>
#include <vector>

namespace starcensus::reports {

/// "single", "primary", "companion".
std::string_view systemRoleName(census::SystemRole role);

/// Appends the columns system_id, system_role, system_flags of a member row to `columns`, and their
/// values for row `row` of the catalogue's input to `block` (`column` is advanced past them). Both do
/// nothing for a null `systems` (a run without the system census, --no-systems).
void appendSystemMembershipColumns(std::vector<photometry::FitsColumn>& columns,
                                   const census::SystemCatalog* systems);
void appendSystemMembership(photometry::FitsRowBlock& block, std::size_t& column,
                            const census::SystemCatalog* systems, std::size_t row);

void writeSystemsTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                       const census::SystemCatalog& systems, const photometry::Classifier& classifier,
                       const census::RowClassRules& rules);

/// Adds "systems" to each radius of fractions.json (same order as the analysis's radii): the system
/// primaries, their fractions by class and the multiplicity per primary class, and "system_finding" at
/// the top level (counts of pairs and systems, the settings).
void addSystemsToFractions(nlohmann::json& fractions, const census::SystemAnalysis& analysis,
                           const census::SystemSettings& settings);

/// Adds "system_primaries" to each radius of priors.json: the priors of the system primaries' classes.
void addSystemPriors(nlohmann::json& priors, const census::SystemAnalysis& analysis);

} // namespace starcensus::reports
