#include "census/LuminosityOptions.h"

#include "census/CensusOptions.h"
#include "photometry/base/InputError.h"
#include "photometry/base/OptionChecks.h"

#include <boost/program_options/value_semantic.hpp>

namespace starcensus::census {

namespace po = boost::program_options;

po::options_description luminosityOptions(LuminosityRunSettings& settings) {
    po::options_description options("Completeness and luminosity function");
    auto add = options.add_options();
    CompletenessSettings& completeness = settings.completeness;
    add("faint-limit", numberOption(completeness.faint_limit_g_mag, "MAG"),
        "survey faint limit in Gaia G (mag); per radius R the sample is complete to M_G = limit - 5 "
        "log10(R/10 pc)");
    add("bright-limit", numberOption(completeness.bright_limit_g_mag, "MAG"),
        "survey bright limit in Gaia G (mag): brighter stars saturate");
    add("estimate-faint-limit", po::bool_switch(&completeness.estimate_faint_limit),
        "take the faint limit from the turnover of the G histogram of the candidates instead");
    add("lf-bin-width", numberOption(settings.luminosity.bin_width_mag, "MAG"),
        "bin width of the luminosity function in M_G (mag)");
    add("lf-fit",
        po::value(&settings.fit_models_text)->default_value(settings.fit_models_text)->value_name("MODEL"),
        "mass function fitted to the luminosity function: chabrier (Chabrier 2003 log-normal + power law), "
        "kroupa (Kroupa 2001 broken power law), both, or none (no fit and no completeness correction)");
    add("lf-fit-min", numberOption(settings.fit.fit_abs_g_min_mag, "MAG"),
        "brightest M_G of the fitted bins (mag)");
    add("lf-fit-max", numberOption(settings.fit.fit_abs_g_max_mag, "MAG"),
        "faintest M_G of the fitted bins (mag)");
    add("lf-scatter", numberOption(settings.model.intrinsic_scatter_mag, "MAG"),
        "intrinsic scatter of M_G about the dwarf locus in the model (mag)");
    return options;
}

void validate(LuminosityRunSettings& settings) {
    validateCompletenessSettings(settings.completeness);
    validateLuminositySettings(settings.luminosity);
    validateMassFunctionFitSettings(settings.fit);
    requireInRange("lf-scatter", settings.model.intrinsic_scatter_mag, 0.0, 2.0, "mag");
    const std::string& text = settings.fit_models_text;
    if (text == "both") {
        settings.fit_models = {ImfFamily::Chabrier2003, ImfFamily::Kroupa2001};
    } else if (text == "chabrier") {
        settings.fit_models = {ImfFamily::Chabrier2003};
    } else if (text == "kroupa") {
        settings.fit_models = {ImfFamily::Kroupa2001};
    } else if (text == "none") {
        settings.fit_models.clear();
    } else {
        throw InputError("--lf-fit: '" + text + "' is not one of chabrier, kroupa, both, none");
    }
}

} // namespace starcensus::census
