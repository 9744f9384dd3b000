#include "census/QualityCuts.h"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <sstream>

namespace starcensus::census {

namespace {

std::string describe(const char* text, double value) {
    std::ostringstream stream;
    stream << text << value;
    return stream.str();
}

bool colourTooNoisy(const photometry::CatalogRow& row, double max_error_mag) {
    return row.bp_error_mag > max_error_mag || row.rp_error_mag > max_error_mag;
}

} // namespace

std::vector<CutOutcome> applyQualityCuts(std::vector<photometry::CatalogRow>& rows,
                                         const QualitySettings& settings) {
    std::vector<CutOutcome> outcomes;

    const auto before = rows.size();
    if (settings.max_ruwe > 0.0) {
        // NaN RUWE compares false and so passes.
        std::erase_if(rows, [&](const photometry::CatalogRow& row) { return row.ruwe > settings.max_ruwe; });
    }
    outcomes.push_back({"ruwe",
                        settings.max_ruwe > 0.0 ? describe("removed: RUWE > ", settings.max_ruwe)
                                                : std::string("no rows removed by RUWE (--max-ruwe 0: off)"),
                        static_cast<std::int64_t>(before - rows.size())});

    std::int64_t inflated = 0;
    if (settings.inflate_errors_above_ruwe > 0.0) {
        for (auto& row : rows) {
            if (row.ruwe > settings.inflate_errors_above_ruwe) {
                row.parallax_error_mas *= row.ruwe;
                ++inflated;
            }
        }
    }
    outcomes.push_back(
        {"ruwe_error_inflation",
         settings.inflate_errors_above_ruwe > 0.0
             ? describe("parallax error multiplied by RUWE: RUWE > ", settings.inflate_errors_above_ruwe)
             : std::string("parallax errors not scaled by RUWE (--inflate-errors-above-ruwe 0: off)"),
         inflated});

    std::int64_t noisy_colours = 0;
    for (auto& row : rows) {
        if (std::isfinite(row.bp_mag) && std::isfinite(row.rp_mag) &&
            colourTooNoisy(row, settings.max_colour_error_mag)) {
            row.bp_mag = photometry::kMissing;
            row.rp_mag = photometry::kMissing;
            ++noisy_colours;
        }
    }
    outcomes.push_back(
        {"colour_error",
         describe("BP-RP dropped (class from M_G alone): BP or RP error > ", settings.max_colour_error_mag),
         noisy_colours});

    const auto low_snr = std::count_if(rows.begin(), rows.end(), [&](const photometry::CatalogRow& row) {
        return !(row.parallax_mas >= settings.min_parallax_snr_to_classify * row.parallax_error_mas);
    });
    outcomes.push_back({"parallax_snr",
                        describe("kept as members but not classified: parallax / error < ",
                                 settings.min_parallax_snr_to_classify),
                        static_cast<std::int64_t>(low_snr)});
    return outcomes;
}

} // namespace starcensus::census
