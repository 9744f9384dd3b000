#pragma once
// The report's figures, drawn with PLplot through its Cairo drivers: each figure is written as SVG and
// PDF (for papers) and PNG (for slides and the rendering test) into one directory. Colours are the
// Okabe-Ito palette (Okabe & Ito 2008, "Color Universal Design"), which stays distinguishable under
// the common colour-vision deficiencies, and every class also has its own marker shape; the sky map's
// sequential scale is viridis (van der Walt & Smith 2015, matplotlib), readable in grey scale too.
#include "reports/ReportAnalysis.h"
#include "reports/ReportInputs.h"

#include <filesystem>
#include <iosfwd>
#include <string>
#include <vector>

namespace starcensus::reports {

struct FigureOutput {
    std::string id; // file stem and HTML id, e.g. "cmd"
    std::string title;
    std::string caption;
    std::filesystem::path svg;
    std::filesystem::path pdf;
    std::filesystem::path png;
};

/// The figure ids drawn when every input is present, in report order.
const std::vector<std::string>& reportFigureIds();

/// Draws every figure the inputs allow into `directory` (created if needed) and returns them in report
/// order; a figure whose input is absent is left out (ReportInputs::notes says why). `progress`, when
/// not null, gets one line per figure. Throws InputError if PLplot lacks a Cairo device.
std::vector<FigureOutput> drawReportFigures(const ReportInputs& inputs, const ReportAnalysis& analysis,
                                            const std::filesystem::path& directory, std::ostream* progress);

} // namespace starcensus::reports
