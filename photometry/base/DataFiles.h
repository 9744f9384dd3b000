#pragma once
// Where the shipped reference tables (data/) live: $STARCENSUS_DATA_DIR if set, else the directory
// compiled in at build time.
#include <string>

namespace starcensus {

std::string dataFilePath(const std::string& file_name);

} // namespace starcensus
