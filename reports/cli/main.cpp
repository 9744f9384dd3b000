// starcensus: the command-line front end. It only parses options and calls the libraries; each library
// owns its options (photometry: reading catalogs; census: membership, cuts, draws, mocks; reports:
// outputs).
#include "reports/cli/Commands.h"

#include "reports/cli/ExitStatus.h"

#include <iostream>
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

} // namespace

int main(int argc, char** argv) {
    const std::vector<std::string> arguments(argv + 1, argv + argc);
    if (arguments.empty() || arguments[0] == "--help" || arguments[0] == "-h" || arguments[0] == "help") {
        std::cout << kUsage;
        return arguments.empty() ? starcensus::cli::kExitUserError : 0;
    }
    if (arguments[0] == "--version") {
        std::cout << "starcensus " << STARCENSUS_VERSION << '\n';
        return 0;
    }
    const std::vector<std::string> rest(arguments.begin() + 1, arguments.end());
    return starcensus::cli::exitStatusOf(
        [&] {
            const std::string& command = arguments[0];
            if (command == "run") {
                return starcensus::cli::runCommand(rest);
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
            std::cerr << "starcensus: error: unknown command '" << command
                      << "' (starcensus --help lists the commands)\n";
            return starcensus::cli::kExitUserError;
        },
        std::cerr);
}
