#include "photometry/catalog/CatalogScan.h"

#include "photometry/SpectralType.h"
#include "photometry/base/InputError.h"
#include "photometry/base/Threads.h"
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/CsvCatalog.h"
#include "photometry/catalog/FitsCatalog.h"
#include "photometry/catalog/VoTableCatalog.h"

#include <fitsio.h>

#include <algorithm>
#include <cctype>
#include <cmath>

namespace starcensus::photometry {

ScanCounts& ScanCounts::operator+=(const ScanCounts& other) {
    rows_read += other.rows_read;
    rows_no_parallax += other.rows_no_parallax;
    rows_unusable_parallax_error += other.rows_unusable_parallax_error;
    rows_below_parallax_limit += other.rows_below_parallax_limit;
    rows_nonpositive_parallax += other.rows_nonpositive_parallax;
    candidates += other.candidates;
    candidates_nonpositive_parallax += other.candidates_nonpositive_parallax;
    candidates_missing_g += other.candidates_missing_g;
    candidates_missing_bp += other.candidates_missing_bp;
    candidates_missing_rp += other.candidates_missing_rp;
    candidates_missing_j += other.candidates_missing_j;
    candidates_missing_h += other.candidates_missing_h;
    candidates_missing_ks += other.candidates_missing_ks;
    candidates_refused_spectral_type += other.candidates_refused_spectral_type;
    return *this;
}

namespace detail {

bool endsWithAnyIgnoringCase(std::string_view path, std::initializer_list<std::string_view> suffixes) {
    return std::any_of(suffixes.begin(), suffixes.end(), [&](std::string_view suffix) {
        return path.size() >= suffix.size() &&
               std::equal(suffix.begin(), suffix.end(),
                          path.end() - static_cast<std::ptrdiff_t>(suffix.size()), [](char a, char b) {
                              return std::tolower(static_cast<unsigned char>(a)) ==
                                     std::tolower(static_cast<unsigned char>(b));
                          });
    });
}

RowMember rowMember(CatalogField field) {
    static constexpr std::array<RowMember, kCatalogFieldCount> members = {
        RowMember(),
        &CatalogRow::ra_deg,
        &CatalogRow::dec_deg,
        &CatalogRow::parallax_mas,
        &CatalogRow::parallax_error_mas,
        &CatalogRow::pmra_mas_per_yr,
        &CatalogRow::pmdec_mas_per_yr,
        &CatalogRow::g_mag,
        &CatalogRow::bp_mag,
        &CatalogRow::rp_mag,
        &CatalogRow::g_error_mag,
        &CatalogRow::bp_error_mag,
        &CatalogRow::rp_error_mag,
        &CatalogRow::j_mag,
        &CatalogRow::h_mag,
        &CatalogRow::ks_mag,
        &CatalogRow::ruwe,
        &CatalogRow::j_error_mag,
        &CatalogRow::h_error_mag,
        &CatalogRow::ks_error_mag,
        &CatalogRow::b_mag,
        &CatalogRow::v_mag,
        &CatalogRow::w1_mag,
        &CatalogRow::w2_mag,
        &CatalogRow::b_error_mag,
        &CatalogRow::v_error_mag,
        &CatalogRow::w1_error_mag,
        &CatalogRow::w2_error_mag,
        &CatalogRow::literature_components,
        RowMember(),
    };
    return members[static_cast<std::size_t>(field)];
}

void setLiteratureType(CatalogRow& row, std::string_view text) {
    if (isBlankLiteratureType(text)) {
        row.literature_status = LiteratureTypeStatus::Absent;
        return;
    }
    const LiteratureType type = parseLiteratureType(text);
    if (!type.parsed) {
        row.literature_status = LiteratureTypeStatus::Refused;
        return;
    }
    row.literature_status = LiteratureTypeStatus::Parsed;
    // Subgiants and giants are the census's evolved class (as the classifier's, Classifier.h), whatever
    // their letter; the code keeps the letter and subtype.
    const bool evolved = type.luminosity_class == LuminosityClass::Supergiant ||
                         type.luminosity_class == LuminosityClass::BrightGiant ||
                         type.luminosity_class == LuminosityClass::Giant ||
                         type.luminosity_class == LuminosityClass::Subgiant;
    row.literature_class = evolved ? StellarClass::Evolved : type.stellar_class;
    row.literature_code = type.spectral_code.value_or(kMissing);
}

ScanAccumulator::ScanAccumulator(FileScanResult& result, const ScanSettings& settings)
    : result_(result), min_parallax_mas_(settings.min_parallax_mas),
      candidate_sigma_(settings.candidate_sigma), keep_candidates_(settings.keep_candidates),
      null_counts_over_all_rows_(settings.null_counts_over_all_rows) {
    result.report.null_counts_over_all_rows = null_counts_over_all_rows_;
    for (const auto& resolved : result.report.mapping.fields) {
        if (!resolved) {
            continue;
        }
        if (resolved->field == CatalogField::SourceId) {
            source_id_mapped_ = true;
        } else if (resolved->field == CatalogField::SpectralType) {
            spectral_type_mapped_ = true;
        } else {
            mapped_doubles_.push_back(
                {static_cast<std::size_t>(resolved->field), rowMember(resolved->field)});
        }
    }
}

void ScanAccumulator::countNulls(const CatalogRow& row) {
    FileScanReport& report = result_.report;
    if (source_id_mapped_ && row.source_id == kMissingSourceId) {
        ++report.null_counts[static_cast<std::size_t>(CatalogField::SourceId)];
    }
    if (spectral_type_mapped_ && row.literature_status == LiteratureTypeStatus::Absent) {
        ++report.null_counts[static_cast<std::size_t>(CatalogField::SpectralType)];
    }
    for (const auto& mapped : mapped_doubles_) {
        if (std::isnan(mapped.member.get(row))) {
            ++report.null_counts[mapped.index];
        }
    }
}

void ScanAccumulator::keep(const CatalogRow& row) {
    if (!null_counts_over_all_rows_) {
        countNulls(row);
    }
    ScanCounts& counts = result_.report.counts;
    ++counts.candidates;
    counts.candidates_nonpositive_parallax += row.parallax_mas <= 0.0 ? 1 : 0;
    counts.candidates_missing_g += std::isnan(row.g_mag) ? 1 : 0;
    counts.candidates_missing_bp += std::isnan(row.bp_mag) ? 1 : 0;
    counts.candidates_missing_rp += std::isnan(row.rp_mag) ? 1 : 0;
    counts.candidates_missing_j += std::isnan(row.j_mag) ? 1 : 0;
    counts.candidates_missing_h += std::isnan(row.h_mag) ? 1 : 0;
    counts.candidates_missing_ks += std::isnan(row.ks_mag) ? 1 : 0;
    counts.candidates_refused_spectral_type += row.literature_status == LiteratureTypeStatus::Refused ? 1 : 0;
    if (keep_candidates_) {
        result_.candidates.push_back(row);
    }
}

void ScanAccumulator::finish(const std::string& where) {
    FileScanReport& report = result_.report;
    if (report.counts.rows_read == 0) {
        report.warnings.push_back(where + ": the table has zero rows; no candidates");
        return;
    }
    const bool all_rows = report.null_counts_over_all_rows;
    const std::int64_t counted = all_rows ? report.counts.rows_read : report.counts.candidates;
    for (const auto& resolved : report.mapping.fields) {
        if (resolved && counted > 0 &&
            report.null_counts[static_cast<std::size_t>(resolved->field)] == counted) {
            report.warnings.push_back(where + ": column " + resolved->column_name + " (" +
                                      std::string(fieldName(resolved->field)) + ") is null in every " +
                                      (all_rows ? "row" : "candidate"));
        }
    }
}

void appendPart(FileScanResult& whole, FileScanResult&& part) {
    FileScanReport& report = whole.report;
    report.counts += part.report.counts;
    for (std::size_t f = 0; f < kCatalogFieldCount; ++f) {
        report.null_counts[f] += part.report.null_counts[f];
    }
    report.parallax_min_mas = std::fmin(report.parallax_min_mas, part.report.parallax_min_mas);
    report.parallax_max_mas = std::fmax(report.parallax_max_mas, part.report.parallax_max_mas);
    if (whole.candidates.empty()) {
        whole.candidates = std::move(part.candidates);
    } else {
        whole.candidates.insert(whole.candidates.end(), part.candidates.begin(), part.candidates.end());
    }
}

} // namespace detail

namespace detail {

unsigned scanThreads(const ScanSettings& settings) {
    // A cfitsio built without --enable-reentrant must not be used from two threads.
    return fits_is_reentrant() == 0 ? 1 : resolveThreadCount(settings.threads);
}

void requireInputFileCount(std::size_t files) {
    if (files > kMaxInputFiles) {
        throw InputError(std::to_string(files) + " input files: at most " + std::to_string(kMaxInputFiles) +
                         " in one run (join some of them first)");
    }
}

RowIndex tableRowIndex(const std::string& path, std::int64_t row) {
    if (row >= kMaxTableRows) {
        throw InputError(path + ": more than " + std::to_string(kMaxTableRows) +
                         " rows in one table (split it into several files)");
    }
    return static_cast<RowIndex>(row);
}

FileScanResult scanFile(const std::string& path, FileIndex file_index, const ScanSettings& settings,
                        unsigned threads, RowShare share) {
    if (isCsvPath(path) || isVoTablePath(path)) {
        if (share.part > 0) { // read whole by part 0 (RowShare)
            FileScanResult empty;
            empty.report.path = path;
            return empty;
        }
        return isCsvPath(path) ? scanCsvFile(path, file_index, settings)
                               : scanVoTableFile(path, file_index, settings);
    }
    return scanFitsFile(path, file_index, settings, threads, share);
}

CatalogScan assembleScan(std::vector<FileScanResult>&& files) {
    CatalogScan scan;
    for (FileScanResult& file : files) {
        scan.totals += file.report.counts;
        std::vector<CatalogRow>& rows = file.candidates;
        if (scan.candidates.empty()) {
            scan.candidates = std::move(rows); // no copy for the first (often only) file
        } else {
            scan.candidates.insert(scan.candidates.end(), rows.begin(), rows.end());
            std::vector<CatalogRow>().swap(rows);
        }
        scan.files.push_back(std::move(file.report));
    }
    return scan;
}

} // namespace detail

CatalogScan scanCatalogs(const std::vector<std::string>& paths, const ScanSettings& settings) {
    detail::requireInputFileCount(paths.size());
    std::vector<detail::FileScanResult> results(paths.size());
    const unsigned threads = detail::scanThreads(settings);
    const unsigned file_threads =
        std::max(1U, std::min<unsigned>(threads, static_cast<unsigned>(paths.size())));
    const unsigned threads_per_file = std::max(1U, threads / file_threads);
    if (settings.progress != nullptr) {
        settings.progress->parts_total += static_cast<int>(paths.size());
    }
    // Files are claimed in order; the error of the first failing file in `paths` is the one thrown.
    forEachIndex(paths.size(), file_threads, [&](std::size_t index) {
        results[index] =
            detail::scanFile(paths[index], static_cast<FileIndex>(index), settings, threads_per_file, {});
        if (settings.progress != nullptr) {
            ++settings.progress->parts_done;
        }
    });
    return detail::assembleScan(std::move(results));
}

} // namespace starcensus::photometry
