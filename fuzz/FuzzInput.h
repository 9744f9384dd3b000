#pragma once
// Shared by the catalogue-reader fuzz targets: the readers take paths (cfitsio, pread(2), mmap(2)), so
// each input is written to a file of the process's own under the temporary directory first.
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <string>

namespace starcensus::fuzz {

/// Writes `size` bytes to `<temp>/starcensus-fuzz-<pid>/input<suffix>` (replacing the previous input) and
/// returns the path.
std::string writeFuzzInput(const std::uint8_t* data, std::size_t size, const std::string& suffix);

} // namespace starcensus::fuzz
