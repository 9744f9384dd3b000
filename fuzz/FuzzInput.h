#pragma once
// Shared by the catalogue-reader fuzz targets: the readers take paths (cfitsio, pread(2), mmap(2)), so
// each input is written to a file of the process's own under the temporary directory first.
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <map>
#include <string>

namespace starcensus::fuzz {

/// Writes `size` bytes to `<temp>/starcensus-fuzz-<pid>/input<suffix>` (replacing the previous input) and
/// returns the path.
std::string writeFuzzInput(const std::uint8_t* data, std::size_t size, const std::string& suffix);

/// Scans the file as a run would (one thread, null counts over every row, a 100 pc candidate limit, the
/// given --unit values); an InputError is an expected outcome and is swallowed, anything else escapes.
void scanExpectingInputErrors(const std::string& path,
                              const std::map<std::string, std::string>& user_units = {});

} // namespace starcensus::fuzz
