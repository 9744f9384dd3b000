#pragma once
// The subcommands of the starcensus executable. Each returns the process exit code; user errors are
// thrown as InputError and reported by main().
#include <string>
#include <vector>

namespace starcensus::cli {

int runCommand(const std::vector<std::string>& arguments);
int simulateCommand(const std::vector<std::string>& arguments);
int inspectCommand(const std::vector<std::string>& arguments);
int demoCommand(const std::vector<std::string>& arguments);
int reportCommand(const std::vector<std::string>& arguments);

} // namespace starcensus::cli
