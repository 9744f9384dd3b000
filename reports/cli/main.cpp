// starcensus: the command-line front end. It only parses options and calls the libraries; each library
// owns its options (photometry: reading catalogs; census: membership, cuts, draws, mocks; reports:
// outputs).
#include "reports/cli/Commands.h"

#include "reports/cli/ExitStatus.h"

#include "photometry/base/InputError.h"

#include <malloc.h>

#include <iostream>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

namespace {

constexpr const char* kUsage = R"(usage: starcensus COMMAND [options]

commands:
  run        census of input catalogs: volume-limited sample, classes, fractions with intervals
  simulate   write a mock solar-neighbourhood catalog (FITS) and its truth (JSON)
  inspect    show how input catalogs are read: HDUs, column mapping and why, units, nulls
  demo       simulate a mock neighbourhood and run the census on it (out/demo/)
  report     write report.html and figures/ (SVG, PDF, PNG) for a run directory

'starcensus COMMAND --help' lists a command's options with units and defaults.
)";

int runArguments(const std::vector<std::string>& arguments, starcensus::ProcessGroup& processes) {
    if (processes.rank() != 0 && (arguments.empty() || arguments[0] != "run")) {
        return 0; // only `run` is spread over processes; the others run once, on rank 0
    }
    if (arguments.empty() || arguments[0] == "--help" || arguments[0] == "-h" || arguments[0] == "help") {
        std::cout << kUsage;
        return arguments.empty() ? starcensus::cli::kExitUserError : 0;
    }
    if (arguments[0] == "--version") {
        std::cout << "starcensus " << STARCENSUS_VERSION << '\n';
        return 0;
    }
    const std::vector<std::string> rest(arguments.begin() + 1, arguments.end());
    const std::string& command = arguments[0];
    if (command == "run") {
        return starcensus::cli::runCommand(rest, processes);
    }
    if (command == "simulate") {
        return starcensus::cli::simulateCommand(rest);
    }
    if (command == "inspect") {
        return starcensus::cli::inspectCommand(rest);
    }
    if (command == "demo") {
        return starcensus::cli::demoCommand(rest);
    }
    if (command == "report") {
        return starcensus::cli::reportCommand(rest);
    }
    throw starcensus::InputError("unknown command '" + command + "' (starcensus --help lists the commands)");
}

} // namespace

int main(int argc, char** argv) {
    // Blocks of 128 KiB or more in mappings of their own, handed back when freed: glibc's adaptive
    // threshold otherwise grows past the census's large vectors after the first is freed and keeps each
    // stage's freed ones for the next (399,783-candidate fractions-only run: peak RSS 97 -> 94 MiB, no
    // slower).
    mallopt(M_MMAP_THRESHOLD, 128 * 1024);
    // Under mpirun every rank runs this and only rank 0 prints an error. A `run` rank that fails before
    // the scan's gather takes part in it with its error, so that no rank waits for it; rank 0 then
    // prints the lowest failed rank's error (the ranks see the same options and files, so usually its
    // own) and exits with its status, the other ranks with 0.
    std::unique_ptr<starcensus::ProcessGroup> processes;
    std::ostringstream errors;
    bool spread_run = false;
    int status = starcensus::cli::exitStatusOf(
        [&] {
            processes = starcensus::joinProcessGroup(argc, argv);
            const std::vector<std::string> arguments(argv + 1, argv + argc);
            spread_run = processes->size() > 1 && !arguments.empty() && arguments[0] == "run";
            try {
                return runArguments(arguments, *processes);
            } catch (const starcensus::ProcessGroupFailure& failure) {
                errors << failure.what(); // another rank's error, as it printed it
                return failure.status;
            }
        },
        errors);
    if (spread_run && status != 0 && !processes->gathered()) {
        const std::string printed = errors.str();
        errors.str("");
        try {
            processes->gatherFailure(status, printed);
        } catch (const starcensus::ProcessGroupFailure& failure) {
            errors << failure.what();
            status = failure.status;
        }
    }
    const bool root = processes == nullptr || processes->rank() == 0;
    if (root) {
        std::cerr << errors.str();
    }
    return root ? status : 0;
}
