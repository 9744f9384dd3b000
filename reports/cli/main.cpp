// starcensus: the command-line front end. It only parses options and calls the libraries; each library
// owns its options (photometry: reading catalogs; census: membership, cuts, draws, mocks; reports:
// outputs).
#include "reports/cli/Commands.h"

#include "reports/cli/ExitStatus.h"

#include "photometry/base/InputError.h"

#include <chrono>
#include <iostream>
#include <memory>
#include <sstream>
#include <string>
#include <thread>
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
    // Under mpirun every rank runs this; only rank 0 prints an error line (the ranks see the same
    // options and files, so they fail alike), and a failed rank ends the whole job so that no rank waits
    // for it. A rank other than 0 first gives rank 0 time to print and end the job itself, and prints its
    // own error only if it is still running then (its failure was its own).
    std::unique_ptr<starcensus::ProcessGroup> processes;
    std::ostringstream errors;
    const int status = starcensus::cli::exitStatusOf(
        [&] {
            processes = starcensus::joinProcessGroup(argc, argv);
            return runArguments(std::vector<std::string>(argv + 1, argv + argc), *processes);
        },
        errors);
    if (processes == nullptr || processes->size() == 1) {
        std::cerr << errors.str();
        return status;
    }
    if (status != 0) {
        if (processes->rank() != 0) {
            std::this_thread::sleep_for(std::chrono::seconds(2));
        }
        std::cerr << errors.str() << std::flush;
        processes->abortAll(status);
    }
    return 0;
}
