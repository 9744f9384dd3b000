#pragma once
// Command-line options of the mock simulator (Boost.Program_options), one per MockSettings field, with
// units, defaults and sources in the help text. Values are range-checked by validateMockSettings().
#include "census/mock/Neighbourhood.h"

#include <boost/any.hpp>
#include <boost/program_options/options_description.hpp>

#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::census::mock {

struct MockRequest {
    MockSettings settings;
    std::uint64_t seed = 1;
};

/// Options that write into `request` on notify() (it must outlive parsing); the defaults shown are
/// `request`'s current values. After notify(), call validateMockSettings(request.settings) (the
/// simulator also does) to reject out-of-range values with an InputError naming the option.
boost::program_options::options_description mockOptionsDescription(MockRequest& request);

} // namespace starcensus::census::mock

namespace starcensus::census {

/// Boost.Program_options parser for --imf: "kroupa" or "chabrier"; anything else is an InputError
/// naming the option, the value and the allowed values. In ImfFamily's namespace, where
/// Program_options finds it (argument-dependent lookup).
void validate(boost::any& value, const std::vector<std::string>& tokens, ImfFamily*, int);

} // namespace starcensus::census
