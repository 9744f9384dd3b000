#include "photometry/catalog/CatalogInspection.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/CsvCatalog.h"

#include <cmath>
#include <iomanip>
#include <sstream>

namespace starcensus::photometry {

std::vector<CatalogInspection> inspectCatalogs(const std::vector<std::string>& paths,
                                               const ScanSettings& settings) {
    ScanSettings counting = settings;
    counting.keep_candidates = false;
    counting.null_counts_over_all_rows = true;
    std::vector<CatalogInspection> inspections;
    for (const auto& path : paths) {
        CatalogInspection inspection;
        inspection.path = path;
        try {
            if (!isCsvPath(path)) {
                inspection.hdus = listHdus(path);
            }
            inspection.scan = std::move(scanCatalogs({path}, counting).files.front());
        } catch (const InputError& error) {
            inspection.error = error.what();
        }
        inspections.push_back(std::move(inspection));
    }
    return inspections;
}

namespace {

void formatHdus(std::ostringstream& out, const std::vector<HduSummary>& hdus) {
    out << "  HDUs:\n";
    for (const auto& hdu : hdus) {
        out << "    " << std::setw(3) << hdu.index << "  " << std::left << std::setw(13) << hdu.type
            << std::setw(16) << (hdu.name.empty() ? "-" : hdu.name) << std::right;
        if (hdu.type == "image") {
            out << (hdu.image_shape == "none" ? "no data" : "data " + hdu.image_shape) << "\n";
        } else {
            out << hdu.rows << " rows, " << hdu.columns << " columns\n";
        }
    }
}

void formatMapping(std::ostringstream& out, const FileScanReport& scan) {
    out << "  " << std::left << std::setw(16) << "field" << std::setw(30) << "column" << std::setw(7)
        << "route" << std::setw(34) << "unit (from)"
        << "nulls\n";
    std::string unmapped;
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const auto& resolved = scan.mapping.fields[i];
        if (!resolved) {
            unmapped.append(" ").append(kCatalogFieldNames[i]);
            continue;
        }
        std::string unit = resolved->flux_over_error ? "flux/error -> mag error"
                                                     : (resolved->unit.empty() ? "-" : resolved->unit) +
                                                           " (" + resolved->unit_source + ")";
        out << "  " << std::setw(16) << kCatalogFieldNames[i] << std::setw(30) << resolved->column_name
            << std::setw(7) << routeName(resolved->route) << std::setw(34) << unit << scan.null_counts[i]
            << "\n";
    }
    out << std::right;
    if (!unmapped.empty()) {
        out << "  unmapped:" << unmapped << "\n";
    }
}

} // namespace

std::string formatInspection(const std::vector<CatalogInspection>& inspections) {
    std::ostringstream out;
    for (const auto& inspection : inspections) {
        out << inspection.path << "\n";
        if (!inspection.hdus.empty()) {
            formatHdus(out, inspection.hdus);
        }
        if (!inspection.error.empty()) {
            out << "  error: " << inspection.error << "\n\n";
            continue;
        }
        const FileScanReport& scan = inspection.scan;
        out << "  table: " << (scan.hdu_name == "CSV" ? "CSV" : "HDU " + std::to_string(scan.hdu_index))
            << (scan.hdu_name.empty() || scan.hdu_name == "CSV" ? "" : " " + scan.hdu_name) << ", "
            << scan.rows << " rows\n";
        formatMapping(out, scan);
        if (std::isnan(scan.parallax_min_mas)) {
            out << "  parallax range: no parallaxes\n";
        } else {
            out << "  parallax range: " << scan.parallax_min_mas << " to " << scan.parallax_max_mas
                << " mas\n";
        }
        const ScanCounts& counts = scan.counts;
        out << "  rows: " << counts.rows_read << " read, " << counts.rows_no_parallax << " without parallax, "
            << counts.rows_unusable_parallax_error << " with unusable parallax error, "
            << counts.rows_nonpositive_parallax << " with parallax <= 0, " << counts.candidates
            << " candidates\n";
        for (const auto& warning : scan.warnings) {
            out << "  warning: " << warning << "\n";
        }
        out << "\n";
    }
    return out.str();
}

} // namespace starcensus::photometry
