#pragma once
// `starcensus run`: catalogs in, census out. Reads and selects the candidates, applies the quality cuts,
// computes membership posteriors, runs the Monte Carlo over measurement errors, summarises fractions per
// radius, finds the stellar systems, fits the host priors and writes sample.fits, systems.fits,
// fractions.json, fractions.csv, priors.json, draws.fits, draws.csv, hosts.fits, provenance.json and the
// completeness and luminosity-function files (reports/LuminosityOutput.h) into the output directory. Every
// file is complete before it appears under its name; nothing is written if any step fails before output.
#include "census/CatalogMerge.h"
#include "census/CensusOptions.h"
#include "census/CompletenessCorrection.h"
#include "census/Fractions.h"
#include "census/HostMeasurements.h"
#include "census/LuminosityOptions.h"
#include "census/Priors.h"
#include "census/QualityCuts.h"
#include "photometry/catalog/CatalogScan.h"
#include "reports/Provenance.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <iosfwd>
#include <string>
#include <vector>

namespace starcensus::reports {

struct PipelineSettings {
    std::vector<std::string> inputs; // paths, globs or @lists
    std::filesystem::path output_directory;
    photometry::ScanSettings scan;
    census::CensusSettings census;            // validated
    census::LuminosityRunSettings luminosity; // validated
    census::HostListSettings hosts;           // seed and threads are taken from census.draws
    nlohmann::json options;                   // every option value of the command (optionValuesJson)
    bool show_progress = false;               // one line per stage on `log` (set when stderr is a terminal)
    ChecksumAlgorithm checksum = ChecksumAlgorithm::Xxh128; // input fingerprints in provenance.json
    // The processes the scan is spread over (mpirun; photometry/base/ProcessGroup.h); nullptr: this one.
    // Ranks other than 0 return from runCensusPipeline after sending their share, with an empty result.
    ProcessGroup* processes = nullptr;
};

struct PipelineTimings {
    double scan_s = 0.0;
    double merge_s = 0.0;
    double posteriors_s = 0.0;
    double draws_s = 0.0;
    double outputs_s = 0.0;    // the stage of the outputs, which holds the four below (run beside the rest)
    double hosts_s = 0.0;      // host re-measurements
    double luminosity_s = 0.0; // luminosity function, mass-function fits, corrected counts
    double systems_s = 0.0;    // companion search and the Monte Carlo of the system primaries
    double tables_s = 0.0;     // writing sample.fits, systems.fits and the draws tables
};

struct PipelineResult {
    std::vector<photometry::FileScanReport> files;
    photometry::ScanCounts scan_totals;
    census::MergeReport merges; // without the per-row links
    std::vector<census::CutOutcome> cuts;
    std::vector<census::RadiusEstimate> estimates;
    std::vector<census::CorrectedRadius> corrected; // completeness-corrected counts; empty without a fit
    std::vector<census::RadiusPriors> priors;
    std::size_t hosts = 0;            // rows of hosts.fits
    bool systems_searched = false;    // false with --no-systems
    std::size_t systems = 0;          // rows of systems.fits
    std::size_t multiple_systems = 0; // of those, with two or more members
    std::size_t candidates_after_cuts = 0;
    PipelineTimings timings;
};

PipelineResult runCensusPipeline(const PipelineSettings& settings, std::ostream& log);

/// A short plain-text summary of a run (counts per radius and the main fractions).
std::string summarizeRun(const PipelineResult& result);

} // namespace starcensus::reports
