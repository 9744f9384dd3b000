#pragma once
// Command-line / config-file options of the completeness tests, the luminosity function and its
// mass-function fit (Completeness.h, LuminosityFunction.h, MassFunctionFit.h).
#include "census/Completeness.h"
#include "census/LuminosityFunction.h"
#include "census/MassFunctionFit.h"

#include <boost/program_options/options_description.hpp>

#include <string>
#include <vector>

namespace starcensus::census {

struct LuminosityRunSettings {
    CompletenessSettings completeness;
    LuminositySettings luminosity;
    MassFunctionFitSettings fit; // fit.family is set per fitted model
    LuminosityModelSettings model;
    std::string fit_models_text = "both"; // --lf-fit: chabrier, kroupa, both or none

    // Set by validate() from fit_models_text (the default is "both"):
    std::vector<ImfFamily> fit_models = {ImfFamily::Chabrier2003, ImfFamily::Kroupa2001};
};

boost::program_options::options_description luminosityOptions(LuminosityRunSettings& settings);

/// Range checks and the --lf-fit list; throws InputError naming the option.
void validate(LuminosityRunSettings& settings);

} // namespace starcensus::census
