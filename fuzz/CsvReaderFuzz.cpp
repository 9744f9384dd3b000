// libFuzzer target: the CSV reader (header row, comments, fields, numbers, column mapping) on arbitrary
// bytes. Any outcome but a result or an InputError is a failure.
#include "fuzz/FuzzInput.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    starcensus::fuzz::scanExpectingInputErrors(starcensus::fuzz::writeFuzzInput(data, size, ".csv"),
                                               {{"ra", "deg"}, {"dec", "deg"}});
    return 0;
}
