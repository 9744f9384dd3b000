#pragma once
// Runs a script of tests/python/ with the reference interpreter (REFERENCE_PYTHON, /usr/bin/python3 with
// Debian's python3-astropy) and returns what it printed; used to check our files with an independent
// reader.
#include <array>
#include <cstdio>
#include <filesystem>
#include <stdexcept>
#include <string>
#include <unistd.h>

namespace starcensus::testing {

/// stdout of `REFERENCE_PYTHON tests/python/<script> <arguments>`; throws if the script fails.
inline std::string runReferencePython(const std::string& script, const std::string& arguments) {
    const std::string command = std::string(REFERENCE_PYTHON) + " '" + STARCENSUS_SOURCE_DIR +
                                "/tests/python/" + script + "' " + arguments;
    FILE* pipe = ::popen(command.c_str(), "r");
    if (pipe == nullptr) {
        throw std::runtime_error("cannot run " + command);
    }
    std::string output;
    std::array<char, 4096> buffer{};
    while (const std::size_t n = std::fread(buffer.data(), 1, buffer.size(), pipe)) {
        output.append(buffer.data(), n);
    }
    if (::pclose(pipe) != 0) {
        throw std::runtime_error("reference script failed: " + command);
    }
    return output;
}

/// A fresh directory under the system temporary directory, removed when the object goes; unique per
/// process and object, so several may exist at once.
class ScratchDirectory {
  public:
    explicit ScratchDirectory(const std::string& name)
        : path_(std::filesystem::temp_directory_path() /
                (name + "-" + std::to_string(::getpid()) + "-" + std::to_string(nextSerial()))) {
        std::filesystem::remove_all(path_);
        std::filesystem::create_directories(path_);
    }
    ~ScratchDirectory() {
        std::error_code ignored;
        std::filesystem::remove_all(path_, ignored);
    }
    ScratchDirectory(const ScratchDirectory&) = delete;
    ScratchDirectory& operator=(const ScratchDirectory&) = delete;
    const std::filesystem::path& path() const { return path_; }
    std::string file(const std::string& name) const { return (path_ / name).string(); }

  private:
    static int nextSerial() {
        static int serial = 0;
        return ++serial;
    }
    std::filesystem::path path_;
};

} // namespace starcensus::testing
