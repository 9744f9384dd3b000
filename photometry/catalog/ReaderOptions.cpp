#include "photometry/catalog/ReaderOptions.h"

#include "photometry/base/InputError.h"

#include <sstream>

namespace starcensus::photometry {

namespace po = boost::program_options;

namespace {

// Allowed ranges (common practice, no source: wide enough for any sensible use, narrow enough to catch
// a typo such as a radius given where a sigma is expected).
constexpr double kMinCandidateSigma = 0.0;
constexpr double kMaxCandidateSigma = 10.0;
constexpr int kMaxThreads = 1024;
constexpr int kMinBlockMiB = 1;
constexpr int kMaxBlockMiB = 1024;

template <class Number>
Number checkedRange(const po::variables_map& options, const std::string& name, Number low, Number high) {
    const Number value = options[name].as<Number>();
    if (!(value >= low && value <= high)) {
        std::ostringstream message;
        message << "option --" << name << " " << value << ": outside the allowed range " << low << " to "
                << high;
        throw InputError(message.str());
    }
    return value;
}

// NAME=VALUE pairs of a repeatable option, keyed by the logical field name.
std::map<std::string, std::string> fieldAssignments(const po::variables_map& options, const std::string& name,
                                                    const std::string& value_label) {
    std::map<std::string, std::string> assignments;
    if (options.count(name) == 0) {
        return assignments;
    }
    for (const auto& text : options[name].as<std::vector<std::string>>()) {
        const auto equals = text.find('=');
        if (equals == std::string::npos || equals == 0 || equals + 1 == text.size()) {
            throw InputError("option --" + name + " '" + text + "': expected NAME=" + value_label +
                             " with NAME one of: " + allFieldNames());
        }
        const auto field = fieldFromName(text.substr(0, equals));
        if (!field) {
            throw InputError("option --" + name + " '" + text + "': unknown field '" +
                             text.substr(0, equals) + "' (fields: " + allFieldNames() + ")");
        }
        const std::string key(fieldName(*field));
        if (!assignments.emplace(key, text.substr(equals + 1)).second) {
            throw InputError("option --" + name + " '" + text + "': field " + key + " is given twice");
        }
    }
    return assignments;
}

} // namespace

po::options_description catalogReaderOptions() {
    const std::string column_help = "take field NAME from column COLUMN (repeatable); overrides UCD and name "
                                    "matching. Fields: " +
                                    allFieldNames();
    po::options_description options("Catalog reading");
    options.add_options()("column",
                          po::value<std::vector<std::string>>()->composing()->value_name("NAME=COLUMN"),
                          column_help.c_str())(
        "unit", po::value<std::vector<std::string>>()->composing()->value_name("NAME=UNIT"),
        "unit of field NAME where the file states none (CSV; FITS without TUNITn), repeatable; "
        "parallaxes: mas, arcsec or uas; ra/dec: deg or rad; pm: mas/yr or arcsec/yr")(
        "hdu", po::value<std::string>()->default_value("", "first binary table")->value_name("HDU"),
        "FITS table to read: 0-based HDU index (0 = primary) or EXTNAME")(
        "candidate-sigma", po::value<double>()->default_value(3.0)->value_name("K"),
        "keep rows with parallax + K * parallax_error above the volume's parallax limit "
        "(standard errors; 0 to 10)")("threads", po::value<int>()->default_value(0)->value_name("N"),
                                      "worker threads for reading files and for the Monte Carlo (0 = one per "
                                      "core; 0 to 1024); results do not depend on it")(
        "read-block-mb", po::value<int>()->default_value(8)->value_name("MIB"),
        "table bytes read per block, in MiB (1 to 1024)");
    return options;
}

ScanSettings scanSettingsFromOptions(const po::variables_map& options) {
    ScanSettings settings;
    settings.user_columns = fieldAssignments(options, "column", "COLUMN");
    settings.user_units = fieldAssignments(options, "unit", "UNIT");
    for (const auto& [name, unit] : settings.user_units) {
        const CatalogField field = *fieldFromName(name);
        if (!unitScale(field, unit)) {
            throw InputError("option --unit '" + name + "=" + unit + "': unit '" + unit +
                             "' is not accepted for " + name + " (accepted: " + acceptedUnits(field) + ")");
        }
    }
    settings.hdu = options["hdu"].as<std::string>();
    settings.candidate_sigma =
        checkedRange(options, "candidate-sigma", kMinCandidateSigma, kMaxCandidateSigma);
    settings.threads = static_cast<unsigned>(checkedRange(options, "threads", 0, kMaxThreads));
    settings.block_bytes =
        static_cast<std::size_t>(checkedRange(options, "read-block-mb", kMinBlockMiB, kMaxBlockMiB)) << 20;
    return settings;
}

} // namespace starcensus::photometry
