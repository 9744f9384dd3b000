#pragma once
// priors.json (schema "starcensus.priors/1"): per radius, the population posterior of every class and
// group as summary numbers and as fitted distributions (a Dirichlet over the standard classes, a Beta per
// fraction, a gamma per density) for occurrence-rate and yield tools; layout in README.md (Outputs).
#include "census/Priors.h"

#include <nlohmann/json.hpp>

#include <vector>

namespace starcensus::reports {

inline constexpr const char* kPriorsSchema = "starcensus.priors/1";

nlohmann::json priorsJson(const std::vector<census::RadiusPriors>& priors);

} // namespace starcensus::reports
