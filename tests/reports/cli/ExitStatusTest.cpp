// The exit statuses README.md documents, one per path: 0 success, 2 user error, 1 internal error with a
// line asking for a report (CommandLineTest.cpp runs the executable for the user errors).
#include "reports/cli/ExitStatus.h"

#include <doctest/doctest.h>

#include <sstream>
#include <stdexcept>

using starcensus::cli::exitStatusOf;

TEST_CASE("exit status: a command's own status passes through, with nothing printed") {
    std::ostringstream errors;
    CHECK(exitStatusOf([] { return 0; }, errors) == 0);
    CHECK(exitStatusOf([] { return 2; }, errors) == 2); // inspect: some file could not be read
    CHECK(errors.str().empty());
}

TEST_CASE("exit status: an InputError is a user error, status 2 and its one line") {
    std::ostringstream errors;
    const int status =
        exitStatusOf([]() -> int { throw starcensus::InputError("--radius: -5 is not positive"); }, errors);
    CHECK(status == 2);
    CHECK(errors.str() == "starcensus: error: --radius: -5 is not positive\n");
}

TEST_CASE("exit status: anything else is an internal error, status 1 and a line asking for a report") {
    std::ostringstream errors;
    CHECK(exitStatusOf([]() -> int { throw std::logic_error("draw tallies out of step"); }, errors) == 1);
    CHECK(errors.str() == "starcensus: internal error: draw tallies out of step (a bug in starcensus: please "
                          "report it with the command line and starcensus --version)\n");
    std::ostringstream unknown;
    CHECK(exitStatusOf([]() -> int { throw 42; }, unknown) == 1);
    CHECK(unknown.str().find("starcensus: internal error: unknown exception") == 0);
    CHECK(unknown.str().find("please report it") != std::string::npos);
}
