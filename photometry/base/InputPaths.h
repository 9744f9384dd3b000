#pragma once
// The input files of a command: paths, shell-style patterns and @lists, resolved before any is read.
#include <string>
#include <vector>

namespace starcensus {

/// Input paths from command-line arguments: shell-style patterns are expanded with glob(3) (sorted), and
/// "@list.txt" reads one path or pattern per line (blank lines and "#" comments skipped; relative paths
/// are relative to the list file's directory). Throws InputError naming a missing file, an unreadable
/// list, or a pattern that matches nothing. A file named twice (after canonicalising, through any mix of
/// paths, patterns and lists) is kept once, where it first appears, with one line for `warnings` (if
/// given) saying so.
std::vector<std::string> expandInputPaths(const std::vector<std::string>& arguments,
                                          std::vector<std::string>* warnings = nullptr);

} // namespace starcensus
