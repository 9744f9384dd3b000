#include "reports/cli/Commands.h"

#include "census/CensusOptions.h"
#include "census/LuminosityOptions.h"
#include "census/mock/Options.h"
#include "census/mock/Output.h"
#include "photometry/base/InputError.h"
#include "photometry/base/InputPaths.h"
#include "photometry/base/OptionChecks.h"
#include "photometry/base/Progress.h"
#include "photometry/catalog/CatalogInspection.h"
#include "photometry/catalog/ReaderOptions.h"
#include "reports/CensusPipeline.h"
#include "reports/Progress.h"
#include "reports/Provenance.h"
#include "reports/Report.h"

#include <boost/program_options.hpp>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <iomanip>
#include <iostream>
#include <sstream>
#include <typeinfo>

namespace starcensus::cli {

namespace po = boost::program_options;

namespace {

struct CommonOptions {
    std::string config_path;
    bool help = false;
};

po::options_description commonOptions(CommonOptions& common) {
    po::options_description options("General");
    auto add = options.add_options();
    add("help,h", po::bool_switch(&common.help), "show this help");
    add("config", po::value(&common.config_path),
        "INI file with any of these options (command line wins), e.g. radius = 5,10,20");
    return options;
}

/// Boost.Program_options reads "-1" into an unsigned option as 2^64 - 1 (its lexical_cast wraps): a minus
/// sign before the value of an unsigned option (--seed, --draws, --threads ...) is refused here instead.
void refuseNegativeUnsigned(const po::parsed_options& parsed, const po::variables_map& values) {
    for (const auto& option : parsed.options) {
        const auto stored = values.find(option.string_key);
        if (stored == values.end()) {
            continue;
        }
        const std::type_info& type = stored->second.value().type();
        if (type != typeid(unsigned) && type != typeid(unsigned long) && type != typeid(unsigned long long)) {
            continue;
        }
        for (const auto& token : option.value) {
            const auto first = token.find_first_not_of(" \t");
            if (first != std::string::npos && token[first] == '-') {
                throw InputError("--" + option.string_key + " " + token + ": must be a non-negative integer");
            }
        }
    }
}

/// Parses command line (and config file) into `values`; true if --help was asked for (and printed).
bool parseOptions(const std::string& command, const std::vector<std::string>& arguments,
                  const po::options_description& options,
                  const po::positional_options_description& positional, const CommonOptions& common,
                  po::variables_map& values) {
    try {
        const auto command_line =
            po::command_line_parser(arguments).options(options).positional(positional).run();
        po::store(command_line, values);
        refuseNegativeUnsigned(command_line, values);
        if (values.count("config") != 0) {
            const auto path = values["config"].as<std::string>();
            std::ifstream config(path);
            if (!config) {
                throw InputError("--config: cannot read " + path);
            }
            const auto from_file = po::parse_config_file(config, options);
            po::store(from_file, values);
            refuseNegativeUnsigned(from_file, values);
        }
        po::notify(values);
    } catch (const po::error& error) {
        throw InputError(std::string(error.what()) + " (starcensus " + command +
                         " --help lists the options)");
    }
    if (common.help) {
        std::cout << "usage: starcensus " << command << " [options]\n\n" << options << '\n';
        return true;
    }
    return false;
}

/// --out must name a directory (or nothing yet): an existing file there is a user error, found before any
/// work is done.
void checkOutputDirectory(const std::string& output_directory) {
    std::error_code error;
    if (std::filesystem::exists(output_directory, error) &&
        !std::filesystem::is_directory(output_directory, error)) {
        throw InputError("--out " + output_directory + ": exists and is not a directory");
    }
}

std::string mockSummary(const census::mock::MockResult& mock, const std::vector<double>& radii_pc) {
    std::ostringstream text;
    text << "simulated " << mock.truth.size() << " objects within " << mock.settings.radius_max_pc << " pc ("
         << mock.catalog.size() << " catalogued";
    if (mock.settings.companion.enabled) {
        const auto both = std::count_if(mock.truth.begin(), mock.truth.end(), [](const auto& object) {
            return object.catalogued && object.in_companion;
        });
        text << "; companion catalogue " << mock.companion_catalog.size() << ", " << both
             << " of them in both";
    }
    text << "), seed " << mock.seed << '\n';
    for (const auto& counts : census::mock::countWithinRadii(mock.truth, radii_pc)) {
        text << "  truth within " << counts.radius_pc << " pc:";
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            if (counts.all[c] > 0) {
                text << ' ' << photometry::kClassNames[c] << ' ' << counts.all[c];
            }
        }
        text << '\n';
    }
    return text.str();
}

/// Recovered counts beside the mock's truth, per radius and class.
std::string truthComparison(const census::mock::MockResult& mock, const reports::PipelineResult& result) {
    std::vector<double> radii;
    for (const auto& estimate : result.estimates) {
        radii.push_back(estimate.radius_pc);
    }
    const auto truth = census::mock::countWithinRadii(mock.truth, radii);
    const bool with_companion = mock.settings.companion.enabled;
    std::ostringstream text;
    text << std::fixed << std::setprecision(1);
    for (std::size_t r = 0; r < radii.size(); ++r) {
        const bool corrected = r < result.corrected.size();
        const auto& listed = with_companion ? truth[r].in_any_file : truth[r].catalogued;
        text << "within " << radii[r] << " pc   truth: all / "
             << (with_companion ? "in either file" : "catalogued") << "   recovered: count [68%]"
             << (corrected ? "   completeness-corrected [68%]" : "") << "\n";
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            const auto& count = result.estimates[r].groups[c].count.this_volume;
            if (truth[r].all[c] == 0 && count.hi95 <= 0.0) {
                continue;
            }
            text << "  " << std::left << std::setw(13) << photometry::kClassNames[c] << std::right
                 << std::setw(6) << truth[r].all[c] << " / " << std::setw(5) << listed[c] << "   "
                 << std::setw(7) << count.median << " [" << count.lo68 << ", " << count.hi68 << "]";
            if (corrected && result.corrected[r].groups[c].corrected) {
                const auto& fixed = result.corrected[r].groups[c].count;
                text << "   " << std::setw(7) << fixed.median << " [" << fixed.lo68 << ", " << fixed.hi68
                     << "]";
            }
            text << "\n";
        }
    }
    return text.str();
}

/// Simulates and writes the mock catalog, its truth and, if `companion_path` is not empty, the companion
/// catalogue.
census::mock::MockResult simulateToFiles(census::mock::MockRequest request,
                                         const std::filesystem::path& catalog_path,
                                         const std::filesystem::path& truth_path,
                                         const std::vector<double>& truth_radii,
                                         const std::filesystem::path& companion_path = {}) {
    request.settings.companion.enabled = !companion_path.empty();
    census::mock::validateMockSettings(request.settings);
    census::mock::MockResult mock = census::mock::simulateNeighbourhood(request.settings, request.seed);
    for (const auto& path : {catalog_path, truth_path, companion_path}) {
        if (path.has_parent_path()) {
            std::filesystem::create_directories(path.parent_path());
        }
    }
    census::mock::writeMockCatalog(catalog_path, mock);
    if (!companion_path.empty()) {
        census::mock::writeCompanionCatalog(companion_path, mock);
    }
    census::mock::writeMockTruth(truth_path, mock, truth_radii);
    return mock;
}

/// Writes report.html and figures/ for a finished run; progress lines only when stderr is a terminal.
void writeReportFor(const std::filesystem::path& directory) {
    const auto report = reports::writeCensusReport(directory, {}, stderrIsTerminal() ? &std::cerr : nullptr);
    std::cout << "report: " << report.html.string() << " (" << report.figures.size() << " figures in "
              << (directory / "figures").string() << "/)\n";
}

/// --hosts-radius and --host-min-probability, bound to the host-list settings.
po::options_description hostOptions(census::HostListSettings& hosts) {
    po::options_description options("Host list (hosts.fits)");
    auto add = options.add_options();
    add("no-hosts", po::bool_switch()->notifier([&hosts](bool off) { hosts.enabled = !off; }),
        "skip the host list and its re-measurements");
    add("hosts-radius",
        po::value(&hosts.radius_pc)->default_value(hosts.radius_pc, "largest")->value_name("PC"),
        "census radius of the host list (pc); one of --radius, default the largest");
    add("host-min-probability",
        po::value(&hosts.min_probability)->default_value(hosts.min_probability, "0.5")->value_name("P"),
        "membership probability at or above which an object is listed as a host (0 to 1)");
    return options;
}

void checkHostOptions(const census::HostListSettings& hosts) {
    requireInRange("host-min-probability", hosts.min_probability, 0.0, 1.0, "");
}

} // namespace

int simulateCommand(const std::vector<std::string>& arguments) {
    CommonOptions common;
    census::mock::MockRequest request;
    std::string catalog_path = "mock.fits";
    std::string truth_path = "truth.json";
    std::string radii_text = "5,10,20,25";
    po::options_description io("Outputs");
    auto add = io.add_options();
    add("out,o", po::value(&catalog_path)->default_value(catalog_path), "mock catalog (FITS binary table)");
    add("truth", po::value(&truth_path)->default_value(truth_path), "truth file (JSON)");
    std::string companion_path;
    add("companion-out", po::value(&companion_path)->value_name("FILE"),
        "also write the companion catalogue of what the Gaia-like survey misses (FITS; ultracool dwarfs, "
        "stars brighter than --g-bright-limit), positions at --companion-epoch");
    add("truth-radii", po::value(&radii_text)->default_value(radii_text),
        "radii (pc) at which the truth file counts objects per class, comma-separated");
    po::options_description options;
    options.add(commonOptions(common)).add(io).add(census::mock::mockOptionsDescription(request));
    po::variables_map values;
    if (parseOptions("simulate", arguments, options, {}, common, values)) {
        return 0;
    }
    const auto radii = census::parsePositiveList(radii_text, "truth-radii");
    const auto mock = simulateToFiles(request, catalog_path, truth_path, radii, companion_path);
    std::cout << mockSummary(mock, radii) << "wrote " << catalog_path
              << (companion_path.empty() ? "" : ", " + companion_path) << " and " << truth_path << '\n';
    return 0;
}

int demoCommand(const std::vector<std::string>& arguments) {
    CommonOptions common;
    std::string output_directory = "out/demo";
    census::mock::MockRequest request; // a 25 pc sphere at 0.1 systems per pc^3 (MockSettings defaults)
    request.settings.wide_companion_fraction = 0.15; // with resolved companions, for the systems outputs
    census::CensusSettings census_settings;
    census_settings.radii_text = "5,10,15,20";
    census_settings.group_definitions = {"FGK=F,G,K", "earlyM=M0-M4", "lateM=M5-M9"};
    po::options_description io("Demo");
    auto add = io.add_options();
    add("out,o", po::value(&output_directory)->default_value(output_directory), "output directory");
    add("seed", po::value(&request.seed)->default_value(request.seed),
        "seed of the mock and of the Monte Carlo");
    add("draws", po::value(&census_settings.draws.draws)->default_value(census_settings.draws.draws),
        "Monte Carlo draws");
    census::HostListSettings hosts;
    po::options_description options;
    options.add(commonOptions(common)).add(io).add(hostOptions(hosts));
    po::variables_map values;
    if (parseOptions("demo", arguments, options, {}, common, values)) {
        return 0;
    }
    checkHostOptions(hosts);
    checkOutputDirectory(output_directory);
    census_settings.draws.seed = request.seed;
    census::validate(census_settings);
    census::hostRadiusIndex(hosts, census_settings.radii_pc); // before the mock is simulated
    const std::filesystem::path directory = output_directory;
    const auto mock = simulateToFiles(request, directory / "mock.fits", directory / "truth.json",
                                      census_settings.radii_pc, directory / "companion.fits");
    std::cout << mockSummary(mock, census_settings.radii_pc);

    // The merged census of both files: the companion's positions are at its own epoch.
    const std::string companion = (directory / "companion.fits").string();
    census_settings.file_epochs = {{companion, mock.settings.companion.epoch_yr}};
    reports::PipelineSettings settings;
    settings.inputs = {(directory / "mock.fits").string(), companion};
    settings.output_directory = directory;
    settings.census = census_settings;
    settings.hosts = hosts;
    settings.options = reports::optionValuesJson(values);
    settings.show_progress = stderrIsTerminal();
    const auto result = reports::runCensusPipeline(settings, std::cerr);
    std::cout << reports::summarizeRun(result) << truthComparison(mock, result) << "outputs in "
              << output_directory << "/\n";
    writeReportFor(output_directory);
    return 0;
}

int runCommand(const std::vector<std::string>& arguments, ProcessGroup& processes) {
    CommonOptions common;
    census::CensusSettings census_settings;
    census::LuminosityRunSettings luminosity_settings;
    std::vector<std::string> inputs;
    std::string output_directory = "out/census";
    po::options_description io("Inputs and outputs");
    auto add = io.add_options();
    add("input,i", po::value(&inputs)->composing(),
        "input catalogs: FITS (also .gz) or CSV files, globs, @list.txt");
    add("out,o", po::value(&output_directory)->default_value(output_directory), "output directory");
    bool no_report = false;
    add("no-report", po::bool_switch(&no_report),
        "skip report.html and figures/ (write them later with starcensus report DIR)");
    std::string checksum_name = "xxh128";
    add("checksum", po::value(&checksum_name)->default_value(checksum_name)->value_name("ALGORITHM"),
        "fingerprint of each input in provenance.json: xxh128 (as xxh128sum prints it), sha256 (as "
        "sha256sum), or none");
    census::HostListSettings hosts;
    po::options_description options;
    options.add(commonOptions(common))
        .add(io)
        .add(photometry::catalogReaderOptions())
        .add(census::censusOptions(census_settings))
        .add(census::luminosityOptions(luminosity_settings))
        .add(hostOptions(hosts));
    po::positional_options_description positional;
    positional.add("input", -1);
    po::variables_map values;
    if (parseOptions("run", arguments, options, positional, common, values)) {
        return 0;
    }
    if (inputs.empty()) {
        throw InputError("--input: no input catalog given");
    }
    checkHostOptions(hosts);
    checkOutputDirectory(output_directory);
    reports::PipelineSettings settings;
    settings.inputs = inputs;
    settings.output_directory = output_directory;
    settings.scan = photometry::scanSettingsFromOptions(values);
    census_settings.draws.threads = settings.scan.threads;
    census::validate(census_settings);
    settings.census = census_settings;
    census::validate(luminosity_settings);
    settings.luminosity = luminosity_settings;
    settings.hosts = hosts;
    settings.checksum = reports::checksumAlgorithmNamed(checksum_name);
    settings.options = reports::optionValuesJson(values);
    settings.show_progress = stderrIsTerminal() && processes.rank() == 0;
    settings.processes = &processes;
    const auto result = reports::runCensusPipeline(settings, std::cerr);
    if (processes.rank() != 0) {
        return 0; // its share of the scan went to rank 0
    }
    std::cout << reports::summarizeRun(result) << "outputs in " << output_directory << "/\n";
    if (!no_report) {
        writeReportFor(output_directory);
    }
    return 0;
}

int reportCommand(const std::vector<std::string>& arguments) {
    CommonOptions common;
    std::string directory;
    po::options_description io("Report");
    io.add_options()(
        "dir", po::value(&directory)->value_name("DIR"),
        "run directory (holds sample.fits and fractions.json); report.html and figures/ go there");
    po::options_description options;
    options.add(commonOptions(common)).add(io);
    po::positional_options_description positional;
    positional.add("dir", 1);
    po::variables_map values;
    if (parseOptions("report", arguments, options, positional, common, values)) {
        return 0;
    }
    if (directory.empty()) {
        throw InputError("report: no run directory given (starcensus report DIR)");
    }
    if (!std::filesystem::is_directory(directory)) {
        throw InputError(directory + ": not a directory");
    }
    writeReportFor(directory);
    return 0;
}

int inspectCommand(const std::vector<std::string>& arguments) {
    CommonOptions common;
    std::vector<std::string> inputs;
    std::string radius_text = "10";
    po::options_description io("Inputs");
    auto add = io.add_options();
    add("input,i", po::value(&inputs)->composing(),
        "catalogs to inspect: FITS (also .gz) or CSV, globs, @list.txt");
    add("radius", po::value(&radius_text)->default_value(radius_text),
        "largest census radius (pc), for the candidate count");
    po::options_description options;
    options.add(commonOptions(common)).add(io).add(photometry::catalogReaderOptions());
    po::positional_options_description positional;
    positional.add("input", -1);
    po::variables_map values;
    if (parseOptions("inspect", arguments, options, positional, common, values)) {
        return 0;
    }
    if (inputs.empty()) {
        throw InputError("--input: no catalog given");
    }
    photometry::ScanSettings settings = photometry::scanSettingsFromOptions(values);
    const auto radii = census::parsePositiveList(radius_text, "radius");
    settings.min_parallax_mas = 1000.0 / *std::max_element(radii.begin(), radii.end());
    std::vector<std::string> path_warnings;
    const auto paths = expandInputPaths(inputs, &path_warnings);
    for (const auto& warning : path_warnings) {
        std::cerr << "starcensus: warning: " << warning << '\n';
    }
    const auto inspections = photometry::inspectCatalogs(paths, settings);
    std::cout << photometry::formatInspection(inspections);
    // 0 when every file could be read, also when required fields are missing: showing what is missing is
    // inspect's job (README, Inspecting an unknown table); 2 for a file that cannot be read.
    const bool all_read =
        std::all_of(inspections.begin(), inspections.end(),
                    [](const photometry::CatalogInspection& inspection) { return inspection.error.empty(); });
    return all_read ? 0 : 2;
}

} // namespace starcensus::cli
