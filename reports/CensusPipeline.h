#pragma once
// `starcensus run`: catalogs in, census out. Reads and selects the candidates, applies the quality cuts,
// computes membership posteriors, runs the Monte Carlo over measurement errors, summarises fractions per
// radius and writes sample.fits, fractions.json and fractions.csv, and the completeness and
// luminosity-function files (reports/LuminosityOutput.h) into the output directory. Every file
// is complete before it appears under its name; nothing is written if any step fails before output.
#include "census/CensusOptions.h"
#include "census/CompletenessCorrection.h"
#include "census/Fractions.h"
#include "census/LuminosityOptions.h"
#include "census/QualityCuts.h"
#include "photometry/CatalogScan.h"

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
};

struct PipelineTimings {
    double scan_s = 0.0;
    double posteriors_s = 0.0;
    double draws_s = 0.0;
    double outputs_s = 0.0;
};

struct PipelineResult {
    std::vector<photometry::FileScanReport> files;
    photometry::ScanCounts scan_totals;
    std::vector<census::CutOutcome> cuts;
    std::vector<census::RadiusEstimate> estimates;
    std::vector<census::CorrectedRadius> corrected; // completeness-corrected counts; empty without a fit
    std::size_t candidates_after_cuts = 0;
    PipelineTimings timings;
};

PipelineResult runCensusPipeline(const PipelineSettings& settings, std::ostream& log);

/// A short plain-text summary of a run (counts per radius and the main fractions).
std::string summarizeRun(const PipelineResult& result);

} // namespace starcensus::reports
