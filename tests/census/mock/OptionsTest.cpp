#include "census/mock/Options.h"

#include "photometry/base/InputError.h"

#include <boost/program_options/parsers.hpp>
#include <boost/program_options/variables_map.hpp>
#include <doctest/doctest.h>

using namespace starcensus::census;
using namespace starcensus::census::mock;
namespace po = boost::program_options;

namespace {

MockRequest parse(std::vector<std::string> arguments) {
    MockRequest request;
    const auto options = mockOptionsDescription(request);
    po::variables_map values;
    po::store(po::command_line_parser(arguments).options(options).run(), values);
    po::notify(values);
    return request;
}

} // namespace

TEST_CASE("simulator options fill the settings; defaults are MockSettings'") {
    const MockRequest defaults = parse({});
    CHECK(defaults.seed == 1);
    CHECK(defaults.settings.radius_max_pc == 25.0);
    CHECK(defaults.settings.imf.family == ImfFamily::Kroupa2001);
    const MockRequest request = parse({"--radius-max", "10", "--density", "0.05", "--seed", "42", "--imf",
                                       "chabrier", "--binary-fraction", "0.5", "--g-limit", "19"});
    CHECK(request.settings.radius_max_pc == 10.0);
    CHECK(request.settings.system_density_per_pc3 == 0.05);
    CHECK(request.seed == 42);
    CHECK(request.settings.imf.family == ImfFamily::Chabrier2003);
    CHECK(request.settings.binary_fraction == 0.5);
    CHECK(request.settings.g_limit_mag == 19.0);
    CHECK_NOTHROW(validateMockSettings(request.settings));
}

TEST_CASE("bad simulator option values are rejected with the value and the allowed range") {
    CHECK_THROWS_WITH_AS(parse({"--imf", "salpeter"}), "--imf: 'salpeter' is not one of kroupa, chabrier",
                         starcensus::InputError);
    const MockRequest request = parse({"--radius-max", "-3"});
    CHECK_THROWS_WITH_AS(validateMockSettings(request.settings),
                         "--radius-max: -3 is outside the allowed range (0, 10000] pc",
                         starcensus::InputError);
    CHECK_THROWS_AS(parse({"--density", "lots"}), po::invalid_option_value);
}
