#include "reports/CensusPipeline.h"

#include "census/MonteCarlo.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"
#include "photometry/base/AtomicOutput.h"
#include "photometry/base/InputError.h"
#include "photometry/base/InputPaths.h"
#include "photometry/base/OptionChecks.h"
#include "photometry/base/ProcessGroup.h"
#include "photometry/base/Progress.h"
#include "reports/DrawsOutput.h"
#include "reports/FractionsOutput.h"
#include "reports/HostsOutput.h"
#include "reports/LuminosityOutput.h"
#include "reports/PriorsOutput.h"
#include "reports/Progress.h"
#include "reports/Provenance.h"
#include "reports/SampleOutput.h"
#include "reports/SystemsOutput.h"

#include <chrono>
#include <ctime>
#include <future>
#include <iomanip>
#include <ostream>
#include <sstream>

namespace starcensus::reports {

namespace {

using Clock = std::chrono::steady_clock;

double secondsSince(Clock::time_point start) {
    return std::chrono::duration<double>(Clock::now() - start).count();
}

nlohmann::json fileEpochsJson(const std::vector<std::pair<std::string, double>>& file_epochs) {
    nlohmann::json epochs = nlohmann::json::object();
    for (const auto& [path, year] : file_epochs) {
        epochs[std::filesystem::absolute(path).string()] = year;
    }
    return epochs;
}

nlohmann::json runProvenance(const PipelineSettings& settings, const std::vector<std::string>& paths) {
    const auto& census = settings.census;
    return {{"software", "starcensus"},
            {"version", STARCENSUS_VERSION},
            {"inputs", paths},
            {"radii_pc", census.radii_pc},
            {"draws", census.draws.draws},
            {"seed", census.draws.seed},
            {"distance_prior", census.prior_name},
            {"prior_outer_distance_pc", census.membership.outer_distance_pc},
            {"parallax_zero_point_mas", census.membership.parallax_zero_point_mas},
            {"parallax_error_scale", census.membership.parallax_error_inflation},
            {"max_ruwe", census.quality.max_ruwe},
            {"min_parallax_snr", census.quality.min_parallax_snr_to_classify},
            {"max_colour_error_mag", census.quality.max_colour_error_mag},
            {"candidate_sigma", settings.scan.candidate_sigma},
            {"spectral_types", census::spectralTypePolicyName(census.spectral_types)},
            {"match_radius_arcsec", census.merge.match_radius_arcsec},
            {"match_parallax_sigma", census.merge.parallax_consistency_sigma},
            {"match_epoch_yr", census.merge.match_epoch_yr},
            {"catalog_epoch_yr", census.merge.default_epoch_yr},
            {"file_epochs_yr", fileEpochsJson(census.file_epochs)},
            {"find_systems", census.find_systems},
            {"system_separation_max_pc", census.systems.max_projected_separation_pc},
            {"system_search_angle_max_deg", census.systems.max_search_angle_deg},
            {"system_sky_shift_deg", census.systems.sky_shift_deg},
            {"system_sky_shifts", census.systems.sky_shifts},
            {"system_chance_max", census.systems.max_chance_probability},
            {"system_ruwe", census.systems.unresolved_ruwe}};
}

/// The merge counts for provenance.json and fractions.json: totals and, per pair of input files with a
/// merge, rows merged by source_id and by position.
nlohmann::json mergesJson(const census::MergeReport& report, const std::vector<std::string>& paths) {
    nlohmann::json pairs = nlohmann::json::array();
    for (const auto& pair : report.file_pairs) {
        pairs.push_back({{"file_a", std::filesystem::absolute(paths[pair.file_a]).string()},
                         {"file_b", std::filesystem::absolute(paths[pair.file_b]).string()},
                         {"by_source_id", pair.by_source_id},
                         {"by_position", pair.by_position}});
    }
    return {{"rows_in", report.rows_in},
            {"rows_out", report.rows_out},
            {"by_source_id", report.source_id_merges},
            {"by_position", report.positional_merges},
            {"pairs_refused_by_parallax", report.pairs_refused_by_parallax},
            {"file_pairs", std::move(pairs)}};
}

/// Epoch of each input file's positions, by file index, from --file-epoch (matched to the inputs by
/// canonical path); throws InputError for a --file-epoch naming no input.
std::vector<double> fileEpochsByIndex(const std::vector<std::pair<std::string, double>>& file_epochs,
                                      const std::vector<std::string>& paths) {
    std::vector<double> epochs(paths.size(), photometry::kMissing);
    const auto canonical = [](const std::string& path) {
        std::error_code error;
        const auto resolved = std::filesystem::canonical(path, error);
        return error ? std::filesystem::absolute(path).lexically_normal() : resolved;
    };
    for (const auto& [path, year] : file_epochs) {
        const auto wanted = canonical(path);
        const auto it = std::find_if(paths.begin(), paths.end(),
                                     [&](const std::string& input) { return canonical(input) == wanted; });
        if (it == paths.end()) {
            throw InputError("--file-epoch " + path + ": not one of the input files");
        }
        epochs[static_cast<std::size_t>(it - paths.begin())] = year;
    }
    return epochs;
}

/// provenance.json: the inputs with checksums, every option value, the resolved settings and the timings.
nlohmann::json provenanceJson(const PipelineSettings& settings, const std::vector<std::string>& paths,
                              nlohmann::json input_files, nlohmann::json merges,
                              const PipelineTimings& timings, const std::vector<std::string>& outputs) {
    const std::time_t now = std::time(nullptr);
    char created[32];
    std::strftime(created, sizeof created, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&now));
    return {{"schema", kProvenanceSchema},
            {"software", "starcensus"},
            {"version", STARCENSUS_VERSION},
            {"created_utc", created},
            {"seed", settings.census.draws.seed},
            {"scan_processes", settings.processes == nullptr ? 1 : settings.processes->size()},
            {"inputs", std::move(input_files)},
            {"merges", std::move(merges)},
            {"command_options", settings.options},
            {"settings", runProvenance(settings, paths)},
            {"timings_s",
             {{"scan", timings.scan_s},
              {"merge", timings.merge_s},
              {"posteriors", timings.posteriors_s},
              {"draws", timings.draws_s},
              {"outputs", timings.outputs_s},
              {"hosts", timings.hosts_s},
              {"luminosity", timings.luminosity_s},
              {"systems", timings.systems_s},
              {"tables", timings.tables_s}}},
            {"outputs", outputs}};
}

} // namespace

PipelineResult runCensusPipeline(const PipelineSettings& settings, std::ostream& log) {
    const auto& census = settings.census;
    PipelineResult result;
    census::HostListSettings hosts = settings.hosts;
    hosts.seed = census.draws.seed;
    hosts.threads = census.draws.threads;
    census::hostRadiusIndex(hosts, census.radii_pc); // a bad --hosts-radius fails before any work
    StageProgress progress(log, settings.show_progress, census.find_systems ? 4 : 3);

    auto start = Clock::now();
    progress.begin("scan");

    std::vector<std::string> path_warnings;
    const std::vector<std::string> paths = expandInputPaths(settings.inputs, &path_warnings);
    for (const auto& warning : path_warnings) {
        log << "starcensus: warning: " << warning << '\n';
    }
    census::CatalogMergeSettings merge_settings = census.merge;
    merge_settings.file_epochs_yr = fileEpochsByIndex(census.file_epochs, paths);
    // Checksums of the inputs for provenance.json: reading a large catalogue again costs about as much as
    // the scan, so it runs beside the census instead of after it.
    const bool root = settings.processes == nullptr || settings.processes->rank() == 0;
    std::future<nlohmann::json> input_files =
        std::async(root ? std::launch::async : std::launch::deferred,
                   [&paths, &settings] { return inputFilesJson(paths, settings.checksum); });
    photometry::ScanSettings scan_settings = settings.scan;
    scan_settings.min_parallax_mas =
        1000.0 / census.radii_pc.back() + census.membership.parallax_zero_point_mas;
    ProgressCounters scan_progress; // shown on stderr if it is a terminal
    scan_settings.progress = &scan_progress;
    photometry::CatalogScan scan = [&] {
        const TerminalProgress display("reading catalogs", "rows", scan_progress, settings.show_progress);
        return settings.processes == nullptr
                   ? photometry::scanCatalogs(paths, scan_settings)
                   : photometry::scanCatalogsAcross(*settings.processes, paths, scan_settings);
    }();
    if (!root) {
        return result; // everything after the scan happens on rank 0
    }
    result.timings.scan_s = secondsSince(start);
    progress.end();
    for (const auto& file : scan.files) {
        for (const auto& warning : file.warnings) {
            log << "starcensus: warning: " << warning << '\n';
        }
    }
    result.files = scan.files;
    result.scan_totals = scan.totals;
    if (scan.candidates.empty()) {
        throw InputError("no candidates: none of the " + std::to_string(scan.totals.rows_read) + " rows in " +
                         std::to_string(paths.size()) + " input file(s) can lie within " +
                         numberText(census.radii_pc.back()) + " pc");
    }
    // One row per object before anything counts them: overlapping catalogues, or one file under two
    // names, would otherwise count a star twice.
    const auto merge_start = Clock::now();
    census::MergedCatalog merged =
        census::mergeCatalogRows(std::move(scan.candidates), merge_settings, census.draws.threads);
    std::vector<photometry::CatalogRow> rows = std::move(merged.rows);
    result.merges = std::move(merged.report);
    result.merges.links.clear(); // per-row detail, not reported
    result.timings.merge_s = secondsSince(merge_start);
    result.cuts = census::applyQualityCuts(rows, census.quality);
    result.candidates_after_cuts = rows.size();

    start = Clock::now();
    // Only the system census draws the sample again: without it, each star is drawn as it is prepared
    // (prepareAndDraw), so no draw table is kept or tabulated twice, and the draws are timed with the
    // posteriors.
    progress.begin(census.find_systems ? "posteriors" : "posteriors and draws");
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    const auto grid = photometry::ClassGrid::fromClassifier(classifier);
    const census::RowClassRules class_rules = census::rowClassRules(census);
    ProgressCounters draw_progress;
    census::DrawSettings draw_settings = census.draws;
    draw_settings.progress = &draw_progress;
    census::DrawnSample drawn = [&] {
        if (!census.find_systems) {
            const TerminalProgress display("Monte Carlo", "star-draws", draw_progress,
                                           settings.show_progress);
            return census::prepareAndDraw(rows, census.radii_pc, census.membership, class_rules, classifier,
                                          grid, draw_settings);
        }
        census::PreparedSample prepared(rows, census.radii_pc, census.membership, class_rules,
                                        census.draws.threads, &classifier, &grid);
        result.timings.posteriors_s = secondsSince(start);
        start = Clock::now();
        progress.begin("draws");
        const TerminalProgress display("Monte Carlo", "star-draws", draw_progress, settings.show_progress);
        census::DrawTallies drawn_tallies = census::drawSample(prepared, grid, draw_settings);
        return census::DrawnSample{std::move(prepared), std::move(drawn_tallies)};
    }();
    const census::PreparedSample& sample = drawn.sample;
    const census::DrawTallies& tallies = drawn.tallies;
    std::vector<double> expected;
    for (std::size_t r = 0; r < census.radii_pc.size(); ++r) {
        expected.push_back(sample.expectedCount(r));
    }
    (census.find_systems ? result.timings.draws_s : result.timings.posteriors_s) = secondsSince(start);

    start = Clock::now();
    progress.begin("outputs");
    // Independent analyses of the draws at once: the host re-measurements (on the Monte Carlo's threads),
    // the fractions, the priors, the sample and draws tables, and (here) the luminosity function,
    // mass-function fits and corrected fractions. Each is deterministic for the seed, so the order they
    // finish in is irrelevant.
    std::future<census::HostMeasurements> host_measurements = std::async(std::launch::async, [&] {
        const auto hosts_start = Clock::now();
        auto measured = hosts.enabled
                            ? census::measureHosts(rows, sample, classifier, census.membership, hosts)
                            : census::HostMeasurements{};
        result.timings.hosts_s = secondsSince(hosts_start);
        return measured;
    });
    // The population deviates, drawn once and summarised two ways.
    std::shared_future<std::vector<census::PopulationDeviates>> population =
        std::async(std::launch::async, [&] {
            return census::populationDeviatesByRadius(tallies, census.groups, {.seed = census.draws.seed});
        }).share();
    std::future<void> fraction_estimates = std::async(std::launch::async, [&] {
        result.estimates = census::estimateFractions(
            tallies, census.radii_pc, census::hardCutCounts(rows, census.radii_pc, census.membership),
            expected, census.groups, population.get());
    });
    std::future<void> prior_fits = std::async(std::launch::async, [&] {
        result.priors = census::estimatePriors(census.radii_pc, census.groups, population.get());
    });
    // Systems: the companion search and the Monte Carlo of the system primaries (SystemFractions.h);
    // nothing with --no-systems, whose outputs then have no system columns or sections.
    std::shared_future<std::optional<census::SystemAnalysis>> systems =
        std::async(std::launch::async, [&]() -> std::optional<census::SystemAnalysis> {
            if (!census.find_systems) {
                return std::nullopt;
            }
            const auto systems_start = Clock::now();
            census::SystemCensusInputs inputs;
            inputs.rows = rows;
            inputs.classifier = &classifier;
            inputs.rules = class_rules;
            inputs.radii_pc = census.radii_pc;
            inputs.membership = census.membership;
            inputs.draws = census.draws;
            inputs.groups = census.groups;
            inputs.systems = census.systems;
            inputs.systems.threads = census.draws.threads;
            inputs.sample = &sample;
            inputs.tallies = &tallies;
            auto analysis = census::analyseSystems(inputs);
            result.timings.systems_s = secondsSince(systems_start);
            return analysis;
        }).share();
    const auto system_catalog = [&]() -> const census::SystemCatalog* {
        return systems.get() ? &systems.get()->catalog : nullptr;
    };
    // sample.fits and the draws tables need only the draws and the systems: they are written beside the
    // analyses.
    const std::filesystem::path& directory = settings.output_directory;
    std::filesystem::create_directories(directory);
    std::future<void> draw_tables = std::async(std::launch::async, [&] {
        const census::SystemCatalog* catalog = system_catalog();
        const auto tables_start = Clock::now();
        writeSampleTable(directory / "sample.fits", rows, sample, tallies, classifier, class_rules, catalog);
        if (catalog != nullptr) {
            writeSystemsTable(directory / "systems.fits", rows, *catalog, classifier, class_rules);
        }
        writeDrawsTable(directory / "draws.fits", tallies, census.radii_pc, census.groups);
        writeTextFileAtomically(directory / "draws.csv", drawsCsv(tallies, census.radii_pc, census.groups));
        result.timings.tables_s = secondsSince(tables_start);
    });
    const auto luminosity_start = Clock::now();
    const census::LuminosityAnalysis luminosity =
        census::analyseLuminosity(rows, sample, tallies, classifier, census, settings.luminosity);
    result.timings.luminosity_s = secondsSince(luminosity_start);
    for (const auto& fit : luminosity.fits) {
        if (!fit.converged) {
            log << "starcensus: warning: " << census::fitModelName(fit.family) << " fit: " << fit.message
                << '\n';
        }
    }
    writeLuminosityOutputs(directory, luminosity);
    draw_tables.get();
    fraction_estimates.get();
    prior_fits.get();
    nlohmann::json provenance = runProvenance(settings, paths);
    // What each quality cut removed or changed, for the report's table.
    provenance["candidates_before_cuts"] = result.merges.rows_out; // one row per object
    provenance["candidates_after_cuts"] = result.candidates_after_cuts;
    provenance["merges"] = mergesJson(result.merges, paths);
    provenance["quality_cuts"] = nlohmann::json::array();
    for (const auto& cut : result.cuts) {
        provenance["quality_cuts"].push_back(
            {{"name", cut.name}, {"description", cut.description}, {"rows_affected", cut.rows_affected}});
    }
    nlohmann::json fractions = fractionsJson(result.estimates, provenance);
    addCompletenessToFractions(fractions, luminosity);
    addSpectralTypeAgreement(fractions, census::compareSpectralTypes(rows, sample, classifier, class_rules),
                             census.spectral_types);
    if (const auto& analysis = systems.get()) {
        result.systems_searched = true;
        addSystemsToFractions(fractions, *analysis, census.systems);
        result.systems = analysis->catalog.systems.size();
        for (const auto& system : analysis->catalog.systems) {
            result.multiple_systems += system.members.size() > 1 ? 1 : 0;
        }
    }
    result.corrected = luminosity.corrected;
    writeJsonFile(directory / "fractions.json", fractions);
    writeTextFileAtomically(directory / "fractions.csv", fractionsCsv(result.estimates));
    nlohmann::json priors = priorsJson(result.priors);
    if (const auto& analysis = systems.get()) {
        addSystemPriors(priors, *analysis);
    }
    writeJsonFile(directory / "priors.json", priors);
    const census::HostMeasurements measured_hosts = host_measurements.get();
    if (hosts.enabled) {
        result.hosts = writeHostTable(directory / "hosts.fits", rows, sample, tallies, classifier,
                                      class_rules, hosts, measured_hosts, system_catalog());
    }
    result.timings.outputs_s = secondsSince(start);
    std::vector<std::string> outputs = {"sample.fits"};
    if (census.find_systems) {
        outputs.push_back("systems.fits");
    }
    outputs.insert(outputs.end(), {"fractions.json", "fractions.csv", "priors.json", "draws.fits",
                                   "draws.csv", "completeness.json", "lumfunc.csv", "lumfunc_fit.json"});
    if (hosts.enabled) {
        outputs.push_back("hosts.fits");
    }
    outputs.push_back("provenance.json");
    writeJsonFile(
        directory / "provenance.json",
        provenanceJson(settings, paths, input_files.get(), provenance["merges"], result.timings, outputs));
    progress.end();
    return result;
}

std::string summarizeRun(const PipelineResult& result) {
    std::ostringstream text;
    text << std::fixed << std::setprecision(1);
    text << "read " << result.scan_totals.rows_read << " rows, " << result.scan_totals.candidates
         << " candidates, " << result.candidates_after_cuts << " after quality cuts\n";
    const census::MergeReport& merges = result.merges;
    text << "  merged " << merges.rows_in << " candidate rows into " << merges.rows_out
         << " objects: " << merges.source_id_merges << " by source_id, " << merges.positional_merges
         << " by position (" << merges.pairs_refused_by_parallax
         << " close pairs kept apart by their parallaxes)\n";
    if (result.systems_searched) {
        text << "  systems: " << result.systems << " (" << result.multiple_systems
             << " with resolved companions; systems.fits)\n";
    } else {
        text << "  systems: not searched (--no-systems)\n";
    }
    for (const auto& cut : result.cuts) {
        text << "  cut " << cut.name << ": " << cut.rows_affected << " (" << cut.description << ")\n";
    }
    for (const auto& estimate : result.estimates) {
        text << "radius " << estimate.radius_pc << " pc: expected members " << estimate.expected_members
             << ", hard parallax cut " << estimate.hard_cut_members << "\n";
        for (const auto& group : estimate.groups) {
            if (group.count.this_volume.hi95 <= 0.0) {
                continue;
            }
            const auto& fraction = group.fraction.population;
            text << "  " << std::left << std::setw(13) << group.name << std::right << " fraction "
                 << std::setprecision(3) << fraction.median << " [" << fraction.lo68 << ", " << fraction.hi68
                 << "]  count " << std::setprecision(1) << group.count.this_volume.median << "\n";
        }
    }
    return text.str();
}

} // namespace starcensus::reports
