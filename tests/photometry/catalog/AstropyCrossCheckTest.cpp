// Cross-check against an independent reader: astropy (python3-astropy from Debian, run with
// REFERENCE_PYTHON) reads the same fixture and converts units with astropy.units. The test fails, never
// skips, when Python or astropy is missing.
#include "FitsFixture.h"

#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/CatalogScanDetail.h"

#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <cmath>

using namespace starcensus::photometry;
using namespace starcensus::testing;

TEST_CASE("the scan agrees with astropy on every mapped value of a mixed-type table") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("mixed.fits");
    writeFitsTable(path, mixedTypeTable(600, 11));
    ScanSettings settings;
    settings.min_parallax_mas = -std::numeric_limits<double>::infinity();
    settings.block_bytes = 4000;
    const CatalogScan scan = scanCatalogs({path}, settings);
    const FileScanReport& report = scan.files[0];

    // Runs with REFERENCE_PYTHON; a missing interpreter or astropy makes it throw, failing (not skipping)
    // the test.
    std::string arguments = path + " " + std::to_string(report.hdu_index);
    for (const auto& resolved : report.mapping.fields) {
        if (resolved) {
            arguments.append(" ")
                .append(fieldName(resolved->field))
                .append("=")
                .append(resolved->column_name);
        }
    }
    const nlohmann::json reference =
        nlohmann::json::parse(runReferencePython("read_with_astropy.py", arguments));
    REQUIRE(reference["rows"].get<std::int64_t>() == 600);
    const nlohmann::json& fields = reference["fields"];
    CHECK(fields.size() == 16); // every field except rp_error, which the fixture lacks

    // Rows the scan skipped are exactly those astropy sees without a parallax or a positive error.
    std::int64_t usable = 0;
    for (std::size_t row = 0; row < 600; ++row) {
        const auto& parallax = fields["parallax"][row];
        const auto& error = fields["parallax_error"][row];
        usable += !parallax.is_null() && !error.is_null() && error.get<double>() > 0.0 ? 1 : 0;
    }
    CHECK(scan.totals.candidates == usable);
    CHECK(scan.totals.rows_read == 600);

    std::size_t compared = 0;
    std::size_t mismatches = 0;
    for (const auto& row : scan.candidates) {
        const auto index = static_cast<std::size_t>(row.row_index);
        for (const auto& [name, values] : fields.items()) {
            const CatalogField field = *fieldFromName(name);
            const nlohmann::json& expected = values[index];
            bool same = false;
            if (field == CatalogField::SourceId) {
                same = expected.is_null() ? row.source_id == kMissingSourceId
                                          : row.source_id == expected.get<std::int64_t>();
            } else {
                const RowMember member = detail::rowMember(field);
                const double actual = member.get(row);
                // Relative 1e-12: both sides decode the same bytes in double precision; only the unit factors
                // (e.g. astropy's arcsec -> mas) may differ in the last bits. A float member holds the
                // nearest float: half a float step more (2^-24 relative).
                const double tolerance = member.isFloat() ? 0x1p-24 + 1e-12 : 1e-12;
                same = expected.is_null() ? std::isnan(actual)
                                          : std::fabs(actual - expected.get<double>()) <=
                                                tolerance * std::fabs(expected.get<double>());
            }
            ++compared;
            if (!same && ++mismatches <= 5) {
                FAIL_CHECK("row " << index << " field " << name << ": scan "
                                  << detail::rowMember(field).get(row) << " (id " << row.source_id
                                  << "), astropy " << expected.dump());
            }
        }
    }
    CHECK(mismatches == 0);
    CHECK(compared > 16 * 400);
}
