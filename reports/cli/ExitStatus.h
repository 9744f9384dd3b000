#pragma once
// The exit status of a command, as README.md documents it: 0 success; 2 a user error (an InputError: one
// line naming the file, column or option); 1 an internal error (anything else: a bug), with a line asking
// for a report.
#include "photometry/base/InputError.h"

#include <exception>
#include <ostream>

namespace starcensus::cli {

inline constexpr int kExitUserError = 2;
inline constexpr int kExitInternalError = 1;

/// Runs `command` (which returns its own status) and turns what it throws into the documented status
/// and one line on `errors`.
template <typename Command>
int exitStatusOf(Command&& command, std::ostream& errors) {
    try {
        return command();
    } catch (const InputError& error) {
        errors << "starcensus: error: " << error.what() << '\n';
        return kExitUserError;
    } catch (const std::exception& error) {
        errors << "starcensus: internal error: " << error.what()
               << " (a bug in starcensus: please report it with the command line and starcensus --version)\n";
        return kExitInternalError;
    } catch (...) {
        errors << "starcensus: internal error: unknown exception (a bug in starcensus: please report it with "
                  "the command line and starcensus --version)\n";
        return kExitInternalError;
    }
}

} // namespace starcensus::cli
