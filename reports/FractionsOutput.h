#pragma once
// fractions.json (schema "starcensus.fractions/1") and fractions.csv: the type fractions, counts and
// densities per radius, for other tools to read. The layout is documented in README.md.
#include "census/Fractions.h"
#include "census/SpectralTypeAgreement.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <string>
#include <vector>

namespace starcensus::reports {

inline constexpr const char* kFractionsSchema = "starcensus.fractions/1";

nlohmann::json intervalJson(const census::IntervalSummary& interval);
/// {"this_volume": intervalJson, "population": intervalJson}.
nlohmann::json twoIntervalsJson(const census::TwoIntervals& intervals);

nlohmann::json fractionsJson(const std::vector<census::RadiusEstimate>& estimates,
                             const nlohmann::json& provenance);

/// Adds "spectral_type_check" to each radius of fractions.json (one agreement per radius, same order):
/// members compared, agreeing, the shares, the subtype difference and the confusion table
/// {literature class: {photometric class: count}} (non-zero cells only).
void addSpectralTypeAgreement(nlohmann::json& fractions,
                              const std::vector<census::SpectralTypeAgreement>& agreements,
                              census::SpectralTypePolicy policy);

/// One row per radius and group, with median / 68% / 95% columns for each quantity and interval kind.
std::string fractionsCsv(const std::vector<census::RadiusEstimate>& estimates);

/// Writes pretty-printed JSON through an atomic rename.
void writeJsonFile(const std::filesystem::path& path, const nlohmann::json& document);

} // namespace starcensus::reports
