// libFuzzer target: the VOTable reader (expat, FIELD attributes and arraysizes, TABLEDATA cells, base64
// BINARY and BINARY2 rows with their null flags, column mapping) on arbitrary bytes. Any outcome but a
// result or an InputError is a failure.
#include "fuzz/FuzzInput.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    starcensus::fuzz::scanExpectingInputErrors(starcensus::fuzz::writeFuzzInput(data, size, ".vot"));
    return 0;
}
