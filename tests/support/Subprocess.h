#pragma once
// Test support: run a command (typically the reference Python with astropy/scipy) and capture stdout.
#include <array>
#include <cstdio>
#include <stdexcept>
#include <string>

namespace starcensus::testing {

struct CommandResult {
    int exit_code;
    std::string output;
};

inline CommandResult runCommand(const std::string& command) {
    FILE* pipe = ::popen(command.c_str(), "r");
    if (pipe == nullptr) {
        throw std::runtime_error("cannot run: " + command);
    }
    std::string output;
    std::array<char, 4096> buffer{};
    while (std::fgets(buffer.data(), static_cast<int>(buffer.size()), pipe) != nullptr) {
        output += buffer.data();
    }
    const int status = ::pclose(pipe);
    return {WIFEXITED(status) ? WEXITSTATUS(status) : -1, output};
}

/// Runs a script from tests/python with the reference interpreter (/usr/bin/python3).
inline CommandResult runReferencePython(const std::string& script_and_arguments) {
    return runCommand(std::string(REFERENCE_PYTHON) + " " + STARCENSUS_SOURCE_DIR + "/tests/python/" +
                      script_and_arguments);
}

} // namespace starcensus::testing
