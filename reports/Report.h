#pragma once
// `starcensus report DIR`: a self-contained report.html (figures embedded as SVG data URIs, inline CSS,
// no scripts, fonts or links to fetch) and the figures as SVG, PDF and PNG in DIR/figures/, from what a
// run left in DIR (see ReportInputs.h).
#include "reports/Figures.h"
#include "reports/ReportAnalysis.h"
#include "reports/ReportInputs.h"

#include <filesystem>
#include <iosfwd>
#include <string>
#include <string_view>
#include <vector>

namespace starcensus::reports {

struct ReportOutput {
    std::filesystem::path html;
    std::vector<FigureOutput> figures;
    std::vector<std::string> notes;
    census::UniformityTest uniformity;
};

/// Reads DIR, draws the figures into DIR/figures/ and writes DIR/report.html (all atomically).
/// `progress`, when not null, gets one line per step. Throws InputError naming a missing or malformed
/// input.
ReportOutput writeCensusReport(const std::filesystem::path& directory, const ReportSettings& settings = {},
                               std::ostream* progress = nullptr);

/// The HTML document for already drawn figures (numerics and layout only; reads the figure SVG files).
std::string reportHtml(const ReportInputs& inputs, const ReportAnalysis& analysis,
                       const std::vector<FigureOutput>& figures);

/// RFC 4648 base64 of bytes.
std::string base64Encode(std::string_view bytes);

/// Text with &, <, >, " escaped for HTML.
std::string escapeHtml(std::string_view text);

} // namespace starcensus::reports
