#include "photometry/base/DataFiles.h"

#include <cstdlib>

namespace starcensus {

std::string dataFilePath(const std::string& file_name) {
    const char* from_environment = std::getenv("STARCENSUS_DATA_DIR");
    const std::string directory = from_environment != nullptr ? from_environment : STARCENSUS_DATA_DIR;
    return directory + "/" + file_name;
}

} // namespace starcensus
