#pragma once
// provenance.json (schema "starcensus.provenance/1"): what a run read (paths, sizes, checksums), every
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

/// XXH3 128-bit hash (xxHash 0.8, Collet; libxxhash) of a byte string, as 32 lower-case hex digits in
/// canonical (big-endian) order: what `xxh128sum` prints.
std::string xxh128Hex(const std::string& bytes);

/// How the input files are fingerprinted in provenance.json (--checksum). XXH128 is the default: it
/// identifies a file as reliably as SHA-256 against accidental change (not against tampering) and is
/// limited by reading the file, which SHA-256 (~1.5 GB/s with the CPU's SHA extensions) is not.
enum class ChecksumAlgorithm { Xxh128, Sha256, None };

/// "xxh128", "sha256" or "none" (the provenance.json key, and the name of the command-line tool that
/// checks it without the "sum"); InputError naming --checksum otherwise.
ChecksumAlgorithm checksumAlgorithmNamed(const std::string& name);
std::string checksumAlgorithmName(ChecksumAlgorithm algorithm);

/// A file's checksum, read in blocks; InputError naming the file if it cannot be read. Empty for None.
std::string fileChecksum(const std::filesystem::path& path, ChecksumAlgorithm algorithm);

/// {"options": {name: value}, "options_given": [names not left at their defaults]} of a parsed command
/// line; values of types without a JSON form are written as "(unprintable)".
nlohmann::json optionValuesJson(const boost::program_options::variables_map& values);

/// [{"path", "size_bytes", ALGORITHM: hex}] of the input files (no checksum key for None).
nlohmann::json inputFilesJson(const std::vector<std::string>& paths, ChecksumAlgorithm algorithm);

} // namespace starcensus::reports
