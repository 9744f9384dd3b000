// libFuzzer target: the literature spectral-type parser, which promises never to throw and to give a
// reason exactly when it refuses a string.
#include "photometry/SpectralType.h"

#include <cstdlib>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    const auto type = starcensus::photometry::parseLiteratureType(text);
    if (type.parsed == type.reason.empty()) {
        return 0;
    }
    std::abort(); // parsed with a reason, or refused without one
}
