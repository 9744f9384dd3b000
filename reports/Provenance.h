#pragma once
// provenance.json (schema "starcensus.provenance/1"): what a run read (paths, sizes, SHA-256), every
// option value, the version, the seed and the timings, so a result can be traced and repeated.
#include <boost/program_options/variables_map.hpp>
#include <nlohmann/json.hpp>

#include <filesystem>
#include <string>
#include <vector>

namespace starcensus::reports {

inline constexpr const char* kProvenanceSchema = "starcensus.provenance/1";

/// SHA-256 (FIPS 180-4) of a byte string, as 64 lower-case hex digits (OpenSSL's EVP interface).
std::string sha256Hex(const std::string& bytes);

/// SHA-256 of a file's contents, read in blocks; InputError naming the file if it cannot be read.
std::string sha256File(const std::filesystem::path& path);

/// {"options": {name: value}, "options_given": [names not left at their defaults]} of a parsed command
/// line; values of types without a JSON form are written as "(unprintable)".
nlohmann::json optionValuesJson(const boost::program_options::variables_map& values);

/// [{"path", "size_bytes", "sha256"}] of the input files.
nlohmann::json inputFilesJson(const std::vector<std::string>& paths);

} // namespace starcensus::reports
