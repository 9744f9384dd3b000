#include "photometry/base/InputPaths.h"

#include "photometry/base/InputError.h"

#include <glob.h>

#include <filesystem>
#include <fstream>
#include <unordered_map>

namespace starcensus {

namespace {

bool isPattern(const std::string& text) {
    return text.find_first_of("*?[") != std::string::npos;
}

void addPathOrPattern(const std::string& entry, const std::string& origin, std::vector<std::string>& paths) {
    if (!isPattern(entry)) {
        std::error_code error;
        if (!std::filesystem::exists(entry, error)) {
            throw InputError(entry + ": no such file" + origin);
        }
        if (std::filesystem::is_directory(entry, error)) {
            throw InputError(entry + ": is a directory, not a catalogue file" + origin +
                             " (name its files, or a pattern such as DIR/*.fits)");
        }
        paths.push_back(entry);
        return;
    }
    glob_t matches{};
    const int status = ::glob(entry.c_str(), 0, nullptr, &matches); // results come sorted
    if (status == 0) {
        for (std::size_t i = 0; i < matches.gl_pathc; ++i) {
            paths.emplace_back(matches.gl_pathv[i]);
        }
    }
    globfree(&matches);
    if (status == GLOB_NOMATCH) {
        throw InputError(entry + ": no file matches this pattern" + origin);
    }
    if (status != 0) {
        throw InputError(entry + ": cannot expand this pattern" + origin);
    }
}

/// The paths with repeats of one file (same canonical path) removed after their first appearance.
std::vector<std::string> withoutRepeats(const std::vector<std::string>& paths,
                                        std::vector<std::string>* warnings) {
    std::vector<std::string> kept;
    std::unordered_map<std::string, std::string> first_name; // canonical path -> path as first given
    for (const auto& path : paths) {
        std::error_code error;
        const std::filesystem::path canonical = std::filesystem::canonical(path, error);
        const auto [it, inserted] = first_name.emplace(error ? path : canonical.string(), path);
        if (inserted) {
            kept.push_back(path);
        } else if (warnings != nullptr) {
            warnings->push_back(path + ": the same file as " + it->second + ", given earlier; read once");
        }
    }
    return kept;
}

} // namespace

std::vector<std::string> expandInputPaths(const std::vector<std::string>& arguments,
                                          std::vector<std::string>* warnings) {
    std::vector<std::string> paths;
    for (const auto& argument : arguments) {
        if (!argument.starts_with("@")) {
            addPathOrPattern(argument, "", paths);
            continue;
        }
        const std::filesystem::path list_path = argument.substr(1);
        std::ifstream list(list_path);
        if (!list) {
            throw InputError(list_path.string() + ": cannot read this list of input files");
        }
        std::string line;
        int line_number = 0;
        while (std::getline(list, line)) {
            ++line_number;
            const auto first = line.find_first_not_of(" \t\r");
            if (first == std::string::npos || line[first] == '#') {
                continue;
            }
            const auto last = line.find_last_not_of(" \t\r");
            std::filesystem::path entry = line.substr(first, last - first + 1);
            if (entry.is_relative()) {
                entry = list_path.parent_path() / entry;
            }
            addPathOrPattern(
                entry.string(),
                " (listed in " + list_path.string() + " line " + std::to_string(line_number) + ")", paths);
        }
    }
    return withoutRepeats(paths, warnings);
}

} // namespace starcensus
