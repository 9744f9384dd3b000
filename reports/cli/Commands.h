#pragma once
// The subcommands of the starcensus executable. Each returns the process exit code; user errors are
// thrown as InputError and reported by main().
#include "photometry/base/ProcessGroup.h"

#include <string>
#include <vector>

namespace starcensus::cli {

/// `run`; under mpirun every rank calls it and `processes` spreads the scan (ProcessGroup.h): rank 0
/// prints, writes and reports, the other ranks only scan their share.
int runCommand(const std::vector<std::string>& arguments, ProcessGroup& processes);
int simulateCommand(const std::vector<std::string>& arguments);
int inspectCommand(const std::vector<std::string>& arguments);
int demoCommand(const std::vector<std::string>& arguments);
int reportCommand(const std::vector<std::string>& arguments);

} // namespace starcensus::cli
