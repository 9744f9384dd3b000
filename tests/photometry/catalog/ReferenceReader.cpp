#include "ReferenceReader.h"

#include "photometry/catalog/CatalogScanDetail.h"

#include <doctest/doctest.h>
#include <fitsio.h>

#include <cmath>
#include <limits>
#include <stdexcept>

namespace starcensus::testing {

using photometry::CatalogField;
using photometry::CatalogRow;

namespace {

void check(int status, const std::string& what) {
    if (status != 0) {
        char text[FLEN_STATUS] = {};
        fits_get_errstatus(status, text);
        fits_clear_errmsg();
        throw std::runtime_error("reference reader: " + what + ": cfitsio status " + std::to_string(status) +
                                 " " + text);
    }
}

bool sameValue(double a, double b) {
    return (std::isnan(a) && std::isnan(b)) || a == b;
}

} // namespace

std::vector<CatalogRow> readCatalogReference(const photometry::FileScanReport& report,
                                             std::uint32_t file_index) {
    int status = 0;
    fitsfile* file = nullptr;
    fits_open_diskfile(&file, report.path.c_str(), READONLY, &status);
    check(status, "opening " + report.path);
    fits_movabs_hdu(file, report.hdu_index + 1, nullptr, &status);
    LONGLONG rows = 0;
    fits_get_num_rowsll(file, &rows, &status);
    check(status, "moving to the table");

    std::vector<CatalogRow> result(static_cast<std::size_t>(rows));
    for (std::size_t i = 0; i < result.size(); ++i) {
        result[i].file_index = file_index;
        result[i].row_index = static_cast<std::int64_t>(i);
    }
    int any_null = 0;
    for (const auto& resolved : report.mapping.fields) {
        if (!resolved || rows == 0) {
            continue;
        }
        const int number = static_cast<int>(resolved->column_index) + 1;
        if (resolved->field == CatalogField::SourceId) {
            std::vector<LONGLONG> ids(result.size());
            LONGLONG missing = photometry::kMissingSourceId;
            fits_read_col(file, TLONGLONG, number, 1, 1, rows, &missing, ids.data(), &any_null, &status);
            check(status, "reading " + resolved->column_name);
            for (std::size_t i = 0; i < result.size(); ++i) {
                result[i].source_id = ids[i];
            }
            continue;
        }
        if (resolved->field == CatalogField::SpectralType) {
            // cfitsio's own string reading (it drops trailing blanks and stops at a NUL).
            int width = 0;
            fits_get_col_display_width(file, number, &width, &status);
            std::vector<std::vector<char>> buffers(result.size(),
                                                   std::vector<char>(static_cast<std::size_t>(width) + 1));
            std::vector<char*> texts(result.size());
            for (std::size_t i = 0; i < result.size(); ++i) {
                texts[i] = buffers[i].data();
            }
            char empty[] = "";
            fits_read_col(file, TSTRING, number, 1, 1, rows, empty, texts.data(), &any_null, &status);
            check(status, "reading " + resolved->column_name);
            for (std::size_t i = 0; i < result.size(); ++i) {
                photometry::detail::setLiteratureType(result[i], texts[i]);
            }
            continue;
        }
        std::vector<double> values(result.size());
        double missing = std::numeric_limits<double>::quiet_NaN();
        fits_read_col(file, TDOUBLE, number, 1, 1, rows, &missing, values.data(), &any_null, &status);
        check(status, "reading " + resolved->column_name);
        const auto member = photometry::detail::rowMember(resolved->field);
        for (std::size_t i = 0; i < result.size(); ++i) {
            member.set(result[i], photometry::canonicalValue(*resolved, values[i]));
        }
    }
    fits_close_file(file, &status);
    return result;
}

std::vector<CatalogRow> referenceCandidates(const std::vector<CatalogRow>& rows,
                                            const photometry::ScanSettings& settings) {
    std::vector<CatalogRow> kept;
    for (const auto& row : rows) {
        const bool usable = std::isfinite(row.parallax_mas) && std::isfinite(row.parallax_error_mas) &&
                            row.parallax_error_mas > 0.0;
        if (usable && row.parallax_mas + settings.candidate_sigma * row.parallax_error_mas >
                          settings.min_parallax_mas) {
            kept.push_back(row);
        }
    }
    return kept;
}

void checkSameRows(const std::vector<CatalogRow>& actual, const std::vector<CatalogRow>& expected) {
    REQUIRE(actual.size() == expected.size());
    std::size_t mismatches = 0;
    for (std::size_t i = 0; i < actual.size(); ++i) {
        const CatalogRow& a = actual[i];
        const CatalogRow& b = expected[i];
        bool same = a.source_id == b.source_id && a.file_index == b.file_index && a.row_index == b.row_index;
        for (std::size_t f = 0; f < photometry::kCatalogFieldCount; ++f) {
            // source_id and spectral_type have no number member; they are compared above and below.
            if (const auto member = photometry::detail::rowMember(static_cast<CatalogField>(f))) {
                same = same && sameValue(member.get(a), member.get(b));
            }
        }
        same = same && a.literature_status == b.literature_status &&
               a.literature_class == b.literature_class && sameValue(a.literature_code, b.literature_code);
        if (!same && ++mismatches <= 5) {
            FAIL_CHECK("row " << i << " differs (file " << a.file_index << " row " << a.row_index << ")");
        }
    }
    CHECK(mismatches == 0);
}

} // namespace starcensus::testing
