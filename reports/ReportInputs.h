#pragma once
// What `starcensus report DIR` reads from a run directory: sample.fits and fractions.json (required),
// and, where present, lumfunc.csv, lumfunc_fit.json, completeness.json and provenance.json (formats in
// README.md). A missing optional file becomes a note in the report; a file that is present but malformed
// is an InputError naming it.
#include <nlohmann/json.hpp>

#include <filesystem>
#include <optional>
#include <string>
#include <vector>

namespace starcensus::reports {

/// The sample.fits columns the report uses, one entry per row (structure of arrays).
struct SampleColumns {
    std::vector<double> ra_deg;
    std::vector<double> dec_deg;
    std::vector<double> parallax_mas;
    std::vector<double> abs_g_mag; // NaN where unknown
    std::vector<double> bp_rp_mag; // NaN where unknown
    std::vector<std::string> class_name;
    std::vector<double> radii_pc;              // from the p_within_<R>pc column names, ascending
    std::vector<std::vector<double>> p_within; // [radius][row]

    std::size_t size() const { return ra_deg.size(); }
};

/// One row of lumfunc.csv.
struct LuminosityFunctionBin {
    std::string population; // main_sequence, white_dwarf, evolved
    double abs_g_lo = 0.0;
    double abs_g_hi = 0.0;
    double n_weighted = 0.0;
    double phi_per_pc3_per_mag = 0.0;
    double phi_lo68 = 0.0;
    double phi_hi68 = 0.0;
    double model_phi_per_pc3_per_mag = 0.0; // NaN where the file leaves it empty
};

struct ReportInputs {
    std::filesystem::path directory;
    SampleColumns sample;
    nlohmann::json fractions;
    std::optional<std::vector<LuminosityFunctionBin>> luminosity_function;
    std::optional<nlohmann::json> luminosity_function_fit;
    std::optional<nlohmann::json> completeness;
    std::optional<nlohmann::json> provenance;
    std::vector<std::string> notes; // one line per optional input that was absent
};

/// Reads a run directory; throws InputError naming the file (or column) that is missing or malformed.
ReportInputs readReportInputs(const std::filesystem::path& directory);

/// Reads sample.fits; throws InputError naming the file or column.
SampleColumns readSampleColumns(const std::filesystem::path& path);

/// Parses lumfunc.csv text; `where` names the file in errors.
std::vector<LuminosityFunctionBin> parseLuminosityFunctionCsv(const std::string& text,
                                                              const std::string& where);

} // namespace starcensus::reports
