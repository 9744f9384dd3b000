// libFuzzer target: the ECSV reader (the "# %ECSV" YAML header through yaml-cpp, the declared columns,
// delimiters, nulls, numbers, column mapping) on arbitrary bytes after a fixed signature line, so every
// input reaches the YAML parser. Any outcome but a result or an InputError is a failure.
#include "fuzz/FuzzInput.h"

#include <string>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    std::string text = "# %ECSV 1.0\n";
    text.append(reinterpret_cast<const char*>(data), size);
    starcensus::fuzz::scanExpectingInputErrors(starcensus::fuzz::writeFuzzInput(
        reinterpret_cast<const std::uint8_t*>(text.data()), text.size(), ".ecsv"));
    return 0;
}
