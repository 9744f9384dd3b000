#include "FitsFixture.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/CsvCatalog.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::photometry;
using namespace starcensus::testing;

namespace {

std::string scanError(const std::string& path, const ScanSettings& settings) {
    return inputErrorOf([&] { scanCatalogs({path}, settings); });
}

} // namespace

TEST_CASE("CSV rows round-trip, with Gaia names implying mas and missing fields as NaN") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("stars.CSV");
    writeText(path, "# a comment before the header\n"
                    "source_id, ra, dec, parallax, parallax_error, phot_g_mean_mag, phot_bp_mean_mag, j_m\n"
                    "4295806720,10.5,-30.25,768.0665,0.0499,8.984,+9.5,5.357\r\n"
                    "\n"
                    "# comment between rows\n"
                    "17,\"200.0\",45.0,NaN,0.5,12.0,,\n"
                    "18,1.0,2.0,-0.25,0.3,13.0,nan,14.0\n");
    CHECK(isCsvPath(path));
    ScanSettings settings;
    settings.min_parallax_mas = 0.5;
    settings.null_counts_over_all_rows = true;
    const CatalogScan scan = scanCatalogs({path}, settings);
    const FileScanReport& report = scan.files[0];
    CHECK(report.hdu_name == "CSV");
    CHECK(report.rows == 3);
    CHECK(report.mapping[CatalogField::Parallax]->unit_source == "Gaia name (mas)");
    REQUIRE(scan.candidates.size() == 2);
    const CatalogRow& first = scan.candidates[0];
    CHECK(first.source_id == 4295806720);
    CHECK(first.ra_deg == 10.5);
    CHECK(first.dec_deg == -30.25);
    CHECK(first.parallax_mas == 768.0665);
    CHECK(first.parallax_error_mas == 0.0499);
    // The magnitudes are float members (CatalogRow.h): the nearest float.
    CHECK(first.g_mag == 8.984f);
    CHECK(first.bp_mag == 9.5f);
    CHECK(first.j_mag == 5.357f);
    CHECK(std::isnan(first.rp_mag));
    CHECK(scan.candidates[1].row_index == 2);
    CHECK(scan.candidates[1].parallax_mas == -0.25);
    CHECK(std::isnan(scan.candidates[1].bp_mag));
    CHECK(scan.totals.rows_no_parallax == 1);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::Bp)] == 2);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::J)] == 1);
}

TEST_CASE("CSV parallaxes under other names need --unit, which converts") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("plx.csv");
    writeText(path, "plx,e_plx,gmag\n0.1,0.001,10\n");
    ScanSettings settings;
    CHECK(scanError(path, settings) ==
          path + ": column plx (parallax) has no unit; state it with --unit "
                 "parallax=UNIT (accepted: mas, milliarcsec, marcsec, arcsec, arcsecond, "
                 "uas, \xC2\xB5"
                 "as, microarcsec, \xCE\xBC"
                 "as)");
    settings.user_units = {{"parallax", "arcsec"}, {"parallax_error", "arcsec"}};
    const CatalogScan scan = scanCatalogs({path}, settings);
    REQUIRE(scan.candidates.size() == 1);
    CHECK(scan.candidates[0].parallax_mas == doctest::Approx(100.0).epsilon(1e-15));
    CHECK(scan.candidates[0].parallax_error_mas == doctest::Approx(1.0).epsilon(1e-15));
}

TEST_CASE("bad CSV input names file, line and column") {
    const ScratchDirectory directory("starcensus-reader");
    const ScanSettings settings;
    const std::string text_value = directory.file("text.csv");
    writeText(text_value, "parallax,parallax_error,gmag\n1,0.1,10\n2,abc,11\n");
    CHECK(scanError(text_value, settings) ==
          text_value + " line 3: column parallax_error (parallax_error): 'abc' is not a number");
    const std::string short_row = directory.file("short.csv");
    writeText(short_row, "parallax,parallax_error,gmag\n1,0.1\n");
    CHECK(scanError(short_row, settings) == short_row + " line 2: 2 fields, the header has 3");
    const std::string empty = directory.file("empty.csv");
    writeText(empty, "# only a comment\n");
    CHECK(scanError(empty, settings) == empty + ": no header row (empty CSV file)");
    const std::string header_only = directory.file("header.csv");
    writeText(header_only, "parallax,parallax_error,gmag\n");
    const CatalogScan scan = scanCatalogs({header_only}, settings);
    CHECK(scan.files[0].rows == 0);
    CHECK(scan.files[0].warnings.at(0) == header_only + ": the table has zero rows; no candidates");
    CHECK(scanError(directory.file("absent.csv"), settings) ==
          directory.file("absent.csv") + ": no such file or not readable");
}

TEST_CASE("CSV spectral types are parsed at read time; refused strings are counted, not thrown") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("types.csv");
    writeText(path, "source_id,parallax,parallax_error,phot_g_mean_mag,SpT\n"
                    "1,100,0.1,10,M4.5 V\n"
                    "2,100,0.1,10,\"DA7.8\"\n"
                    "3,100,0.1,10,\n"
                    "4,100,0.1,10,L0: INT-G\n"
                    "5,100,0.1,10,not a type\n"
                    "6,100,0.1,10,NaN\n");
    ScanSettings settings;
    settings.null_counts_over_all_rows = true;
    const CatalogScan scan = scanCatalogs({path}, settings);
    const FileScanReport& report = scan.files[0];
    REQUIRE(report.mapping[CatalogField::SpectralType].has_value());
    CHECK(report.mapping[CatalogField::SpectralType]->column_name == "SpT");
    CHECK(report.mapping[CatalogField::SpectralType]->route == MappingRoute::Name);
    REQUIRE(scan.candidates.size() == 6);
    const auto& rows = scan.candidates;
    // Codes by SpectralType.h's scale: M0 = 60, L0 = 70.
    CHECK(rows[0].literature_status == LiteratureTypeStatus::Parsed);
    CHECK(rows[0].literature_class == StellarClass::M);
    CHECK(rows[0].literature_code == 64.5);
    CHECK(rows[1].literature_class == StellarClass::WhiteDwarf);
    CHECK(std::isnan(rows[1].literature_code)); // white dwarfs have no dwarf code
    CHECK(rows[2].literature_status == LiteratureTypeStatus::Absent);
    CHECK(rows[2].literature_class == StellarClass::Unclassified);
    CHECK(std::isnan(rows[2].literature_code));
    CHECK(rows[3].literature_class == StellarClass::L);
    CHECK(rows[3].literature_code == 70.0);
    CHECK(rows[4].literature_status == LiteratureTypeStatus::Refused);
    CHECK(rows[4].literature_class == StellarClass::Unclassified);
    CHECK(rows[5].literature_status == LiteratureTypeStatus::Absent);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::SpectralType)] == 2);
    CHECK(scan.totals.candidates_refused_spectral_type == 1);
    // The numeric fields are read as before.
    CHECK(rows[4].parallax_mas == 100.0);
}

TEST_CASE("CSV lines across inflated blocks: plain and gzip give every row, a NUL byte is refused") {
    // Rows of 100 to 4,100 bytes and one of 2.5 MiB, so that lines straddle the 1 MiB blocks the inflate
    // thread hands over (InflatedBlocks.h) and one spans three of them; every 7th row is a candidate.
    const ScratchDirectory directory("starcensus-reader");
    const std::string plain = directory.file("long.csv");
    std::string text = "source_id,parallax,parallax_error,phot_g_mean_mag,note\n";
    constexpr int kRows = 3000;
    for (int i = 0; i < kRows; ++i) {
        const std::size_t padding =
            i == 1400 ? std::size_t{5} << 19 : static_cast<std::size_t>(100 + (i * 37) % 4000);
        text += std::to_string(i) + "," + (i % 7 == 0 ? std::to_string(100 + i) : "1") + ",0.5," +
                std::to_string(10 + i % 5) + "," + std::string(padding, 'x') + "\n";
    }
    writeText(plain, text);
    const std::string compressed = directory.file("long.csv.gz");
    gzipFile(plain, compressed);
    ScanSettings settings;
    settings.min_parallax_mas = 40.0; // 25 pc
    for (const auto& path : {plain, compressed}) {
        const CatalogScan scan = scanCatalogs({path}, settings);
        CHECK(scan.files[0].rows == kRows);
        REQUIRE(scan.candidates.size() == (kRows + 6) / 7);
        for (std::size_t k = 0; k < scan.candidates.size(); ++k) {
            const CatalogRow& row = scan.candidates[k];
            const auto i = static_cast<std::int64_t>(7 * k);
            CHECK(row.source_id == i);
            CHECK(row.row_index == i);
            CHECK(row.parallax_mas == static_cast<double>(100 + i));
            CHECK(row.g_mag == static_cast<double>(10 + i % 5));
        }
    }
    const std::string binary = directory.file("nul.csv");
    writeText(binary, std::string("parallax,parallax_error\n1,0.1\n2,0.") + '\0' + "1\n");
    CHECK(scanError(binary, settings) == binary + " line 3: a NUL byte (binary data, not text)");
}

TEST_CASE("row and file indices beyond CatalogRow's widths are refused with the file named") {
    // CatalogRow holds file_index in 16 bits and row_index in 32 (CatalogRow.h).
    CHECK(detail::tableRowIndex("big.csv", kMaxTableRows - 1) == 4294967295u);
    CHECK_THROWS_WITH_AS(detail::tableRowIndex("big.csv", kMaxTableRows),
                         "big.csv: more than 4294967296 rows in one table (split it into several files)",
                         starcensus::InputError);
    CHECK_NOTHROW(detail::requireInputFileCount(65536));
    CHECK_THROWS_WITH_AS(detail::requireInputFileCount(65537),
                         "65537 input files: at most 65536 in one run (join some of them first)",
                         starcensus::InputError);
}
