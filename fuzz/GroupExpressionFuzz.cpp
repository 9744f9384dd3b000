// libFuzzer target: the --group NAME=ITEMS parser. Any outcome but a group or an InputError is a failure.
#include "census/ClassGroups.h"
#include "photometry/base/InputError.h"

#include <cstdint>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    try {
        starcensus::census::parseClassGroup(std::string_view(reinterpret_cast<const char*>(data), size));
    } catch (const starcensus::InputError&) {
    }
    return 0;
}
