// libFuzzer target: the INI file of `run --config` (Boost.Program_options' parser, then our own checks of
// every value: the reader's, the census's and the luminosity analysis's options, as runCommand applies
// them). Any outcome but settings, an InputError or a Boost.Program_options error (which the command
// line turns into an InputError) is a failure.
#include "census/CensusOptions.h"
#include "census/LuminosityOptions.h"
#include "photometry/base/InputError.h"
#include "photometry/catalog/ReaderOptions.h"

#include <boost/program_options.hpp>

#include <sstream>

namespace po = boost::program_options;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    starcensus::census::CensusSettings census_settings;
    starcensus::census::LuminosityRunSettings luminosity_settings;
    po::options_description options;
    options.add(starcensus::photometry::catalogReaderOptions())
        .add(starcensus::census::censusOptions(census_settings))
        .add(starcensus::census::luminosityOptions(luminosity_settings));
    std::istringstream config(std::string(reinterpret_cast<const char*>(data), size));
    try {
        po::variables_map values;
        po::store(po::parse_config_file(config, options), values);
        po::notify(values);
        const auto scan = starcensus::photometry::scanSettingsFromOptions(values);
        census_settings.draws.threads = scan.threads;
        starcensus::census::validate(census_settings);
        starcensus::census::validate(luminosity_settings);
    } catch (const po::error&) {
    } catch (const starcensus::InputError&) {
    }
    return 0;
}
