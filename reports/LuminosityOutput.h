#pragma once
// The files of the luminosity analysis (census/LuminosityAnalysis.h): completeness.json (schema
// "starcensus.completeness/1"), lumfunc.csv and lumfunc_fit.json (schema "starcensus.lumfunc_fit/1");
// fractions.json gains per class a `completeness` and a `corrected` block. The layouts are documented in
// README.md (Outputs).
#include "census/LuminosityAnalysis.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <string>

namespace starcensus::reports {

inline constexpr const char* kCompletenessSchema = "starcensus.completeness/1";
inline constexpr const char* kLumfuncFitSchema = "starcensus.lumfunc_fit/1";

nlohmann::json completenessJson(const census::LuminosityAnalysis& analysis);
nlohmann::json lumfuncFitJson(const census::LuminosityAnalysis& analysis);
std::string lumfuncCsv(const census::LuminosityAnalysis& analysis);

/// Adds `completeness` (model share seen, null without a fit) and `corrected` ({count, fraction,
/// missing} intervals, null without a fit) to every class of every radius of a fractions.json document.
void addCompletenessToFractions(nlohmann::json& fractions, const census::LuminosityAnalysis& analysis);

/// Writes completeness.json, lumfunc.csv and lumfunc_fit.json into `directory` (atomically).
void writeLuminosityOutputs(const std::filesystem::path& directory,
                            const census::LuminosityAnalysis& analysis);

} // namespace starcensus::reports
