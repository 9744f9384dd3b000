#include "FitsFixture.h"
#include "ReferenceReader.h"

#include "photometry/catalog/CatalogInspection.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/FitsCatalog.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>

#include <atomic>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <thread>

using namespace starcensus::photometry;
using namespace starcensus::testing;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// A small Gaia-like table with hand-picked values.
FixtureTable smallGaiaTable() {
    FixtureColumn ids = makeColumn("source_id", "1K");
    ids.integers = {4295806720, 38655544960, 1, 6917528997577384320};
    return {"GAIA",
            {ids, valueColumn("ra", "1D", "deg", {10.5, 200.25, 359.0, 0.125}),
             valueColumn("dec", "1D", "deg", {-30.0, 45.5, 89.0, -89.5}),
             valueColumn("parallax", "1E", "mas", {100.5, 2.25, -0.5, kNaN}),
             valueColumn("parallax_error", "1E", "mas", {0.25, 0.5, 0.75, 1.0}),
             valueColumn("pmra", "1D", "mas/yr", {-1200.5, 3.0, 0.0, 1.0}),
             valueColumn("pmdec", "1D", "mas/yr", {800.25, -4.0, 0.0, 1.0}),
             valueColumn("phot_g_mean_mag", "1E", "mag", {9.5, 17.25, 20.75, 12.0}),
             valueColumn("phot_bp_mean_mag", "1E", "mag", {10.0, kNaN, 21.5, 12.5}),
             valueColumn("phot_rp_mean_mag", "1E", "mag", {9.0, 16.5, kNaN, 11.5}),
             valueColumn("phot_g_mean_flux_over_error", "1E", "", {1000.0, 50.0, 4.0, 0.0}),
             valueColumn("ruwe", "1E", "", {1.0, 1.5, 0.75, 2.0})}};
}

ScanSettings everything() {
    ScanSettings settings;
    settings.min_parallax_mas = -std::numeric_limits<double>::infinity();
    settings.null_counts_over_all_rows = true;
    return settings;
}

// A parallax table at `path` whose card starting `card_start` (searched from byte `from`) has its bytes
// from column `column` (0-based; 9 is just after the '=') replaced by `replacement`, and its gzip copy:
// the damaged-header cases. Returns both paths.
std::vector<std::string> tableWithDamagedCard(const std::string& path, const std::string& card_start,
                                              std::size_t from, std::size_t column,
                                              const std::string& replacement) {
    writeFitsTable(path, {"",
                          {valueColumn("parallax", "1D", "mas", {1.0}),
                           valueColumn("parallax_error", "1D", "mas", {1.0})}});
    {
        std::fstream file(path, std::ios::in | std::ios::out | std::ios::binary);
        std::string header(2 * 2880, ' ');
        file.read(header.data(), static_cast<std::streamsize>(header.size()));
        const auto card = header.find(card_start, from);
        REQUIRE(card != std::string::npos);
        file.seekp(static_cast<std::streamoff>(card + column));
        file << replacement;
    }
    gzipFile(path, path + ".gz");
    return {path, path + ".gz"};
}

} // namespace

TEST_CASE("known values come back exactly, in canonical units, with the mapping recorded") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("gaia.fits");
    writeFitsTable(path, smallGaiaTable());
    ScanSettings settings;
    settings.min_parallax_mas = 1.0; // 1 kpc
    settings.null_counts_over_all_rows = true;
    const CatalogScan scan = scanCatalogs({path}, settings);

    REQUIRE(scan.files.size() == 1);
    const FileScanReport& report = scan.files[0];
    CHECK(report.hdu_index == 1);
    CHECK(report.hdu_name == "GAIA");
    CHECK(report.rows == 4);
    CHECK(report.mapping[CatalogField::G]->route == MappingRoute::Name);
    CHECK(report.mapping[CatalogField::G]->column_name == "phot_g_mean_mag");
    CHECK(report.mapping[CatalogField::GError]->flux_over_error);

    // Row 0 (2.25 + 3 * 0.5 > 1) and row 1 pass; row 2 (-0.5 + 2.25 = 1.75 > 1) passes with a negative
    // parallax; row 3 has no parallax.
    REQUIRE(scan.candidates.size() == 3);
    const CatalogRow& first = scan.candidates[0];
    CHECK(first.source_id == 4295806720);
    CHECK(first.ra_deg == 10.5);
    CHECK(first.dec_deg == -30.0);
    CHECK(first.parallax_mas == 100.5);
    CHECK(first.parallax_error_mas == 0.25);
    CHECK(first.pmra_mas_per_yr == -1200.5);
    CHECK(first.pmdec_mas_per_yr == 800.25);
    CHECK(first.g_mag == 9.5);
    CHECK(first.bp_mag == 10.0);
    CHECK(first.rp_mag == 9.0);
    CHECK(first.g_error_mag == doctest::Approx(2.5 / std::log(10.0) / 1000.0).epsilon(1e-7)); // float SNR
    CHECK(first.ruwe == 1.0);
    CHECK(std::isnan(first.j_mag));
    CHECK(first.row_index == 0);
    CHECK(std::isnan(scan.candidates[1].bp_mag));
    CHECK(scan.candidates[2].source_id == 1);
    CHECK(scan.candidates[2].parallax_mas == -0.5);
    CHECK(std::isnan(scan.candidates[2].rp_mag));

    const ScanCounts expected{.rows_read = 4,
                              .rows_no_parallax = 1,
                              .rows_nonpositive_parallax = 1,
                              .candidates = 3,
                              .candidates_nonpositive_parallax = 1,
                              .candidates_missing_bp = 1,
                              .candidates_missing_rp = 1,
                              .candidates_missing_j = 3,
                              .candidates_missing_h = 3,
                              .candidates_missing_ks = 3};
    CHECK(scan.totals == expected);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::Parallax)] == 1);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::GError)] == 1); // SNR 0
    CHECK(report.parallax_min_mas == -0.5);
    CHECK(report.parallax_max_mas == 100.5);
    CHECK(report.warnings.empty());
}

TEST_CASE("mapping routes: user, UCD and name in one file") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("routes.fits");
    writeFitsTable(path,
                   {"",
                    {valueColumn("W_PI", "1D", "mas", {5.0}, "pos.parallax"),
                     valueColumn("plx", "1D", "mas", {7.0}), valueColumn("e_plx", "1D", "mas", {0.5}),
                     valueColumn("MY_G", "1D", "mag", {12.0}), valueColumn("gmag", "1D", "mag", {13.0})}});
    ScanSettings settings = everything();
    settings.user_columns = {{"g", "my_g"}};
    const CatalogScan scan = scanCatalogs({path}, settings);
    const ColumnMapping& mapping = scan.files[0].mapping;
    CHECK(mapping[CatalogField::Parallax]->route == MappingRoute::Ucd);
    CHECK(mapping[CatalogField::ParallaxError]->route == MappingRoute::Name);
    CHECK(mapping[CatalogField::G]->route == MappingRoute::User);
    CHECK(mapping[CatalogField::G]->column_name == "MY_G");
    REQUIRE(scan.candidates.size() == 1);
    CHECK(scan.candidates[0].parallax_mas == 5.0);
    CHECK(scan.candidates[0].g_mag == 12.0);
}

TEST_CASE("integer nulls come from TNULL and an unsigned 64-bit source_id from TZERO") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("nulls.fits");
    FixtureColumn ids = makeColumn("source_id", "1W");
    ids.integers = {std::int64_t{9'000'000'000'000'000'000}, 0, 42};
    FixtureColumn error = valueColumn("parallax_error", "1J", "uas", {150.0, kNaN, 250.0});
    error.tnull = -99;
    FixtureColumn j = valueColumn("j_m", "1I", "mag", {kNaN, 12.5, 13.0});
    j.tnull = -32768;
    j.tscal = 0.01;
    writeFitsTable(path, {"",
                          {ids, valueColumn("parallax", "1D", "uas", {1500.0, 2000.0, 2500.0}), error,
                           valueColumn("phot_g_mean_mag", "1D", "mag", {10.0, 11.0, 12.0}), j}});
    const CatalogScan scan = scanCatalogs({path}, everything());
    REQUIRE(scan.candidates.size() == 2);
    CHECK(scan.candidates[0].source_id == std::int64_t{9'000'000'000'000'000'000});
    CHECK(scan.candidates[0].parallax_mas == doctest::Approx(1.5).epsilon(1e-15));
    CHECK(scan.candidates[0].parallax_error_mas == doctest::Approx(0.15).epsilon(1e-15));
    CHECK(std::isnan(scan.candidates[0].j_mag));
    CHECK(scan.candidates[1].source_id == 42);
    CHECK(scan.candidates[1].j_mag == doctest::Approx(13.0).epsilon(1e-15));
    CHECK(scan.totals.rows_unusable_parallax_error == 1);
    const FileScanReport& report = scan.files[0];
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::ParallaxError)] == 1);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::J)] == 1);
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::SourceId)] == 0);
}

TEST_CASE("parallaxes in arcsec convert to mas") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("arcsec.fits");
    writeFitsTable(
        path, {"",
               {valueColumn("plx", "1D", "arcsec", {0.7687}), valueColumn("e_plx", "1D", "arcsec", {0.0003}),
                valueColumn("gmag", "1D", "", {11.0}), valueColumn("RA", "1D", "rad", {M_PI})}});
    const CatalogScan scan = scanCatalogs({path}, everything());
    REQUIRE(scan.candidates.size() == 1);
    CHECK(scan.candidates[0].parallax_mas == doctest::Approx(768.7).epsilon(1e-15));
    CHECK(scan.candidates[0].parallax_error_mas == doctest::Approx(0.3).epsilon(1e-15));
    CHECK(scan.candidates[0].ra_deg == doctest::Approx(180.0).epsilon(1e-15));
}

TEST_CASE("the fast block scan equals the column-by-column reference, also from a .gz copy") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("mixed.fits");
    writeFitsTable(path, mixedTypeTable(3000, 7));
    const std::string gz_path = directory.file("mixed.fits.gz");
    gzipFile(path, gz_path);

    ScanSettings settings;
    settings.min_parallax_mas = 5.0;
    settings.block_bytes = 1000; // ~8 rows per block: many blocks and a short last one
    settings.null_counts_over_all_rows = true;
    const CatalogScan scan = scanCatalogs({path}, settings);
    const FileScanReport& report = scan.files[0];
    CHECK(report.mapping[CatalogField::Parallax]->route == MappingRoute::Ucd);
    CHECK(report.mapping[CatalogField::Ruwe]->column_name == "ruwe");

    const std::vector<CatalogRow> all = readCatalogReference(report, 0);
    REQUIRE(all.size() == 3000);
    const std::vector<CatalogRow> expected = referenceCandidates(all, settings);
    CHECK(expected.size() > 500);
    CHECK(expected.size() < 2500);
    checkSameRows(scan.candidates, expected);

    // Every row kept: checks each decoded value, including nulls in rows the test would drop.
    const CatalogScan everything_scan = scanCatalogs({path}, everything());
    checkSameRows(everything_scan.candidates, referenceCandidates(all, everything()));
    std::size_t null_bp = 0;
    for (const auto& row : all) {
        null_bp += std::isnan(row.bp_mag) ? 1 : 0;
    }
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::Bp)] ==
          static_cast<std::int64_t>(null_bp));
    CHECK(null_bp > 200);
    // Without the all-row pass (what run does), the nulls are those of the candidates.
    settings.null_counts_over_all_rows = false;
    const CatalogScan candidates_only = scanCatalogs({path}, settings);
    checkSameRows(candidates_only.candidates, expected);
    CHECK(candidates_only.totals == scan.totals);
    const auto null_bp_candidates = std::count_if(
        expected.begin(), expected.end(), [](const CatalogRow& row) { return std::isnan(row.bp_mag); });
    CHECK(candidates_only.files[0].null_counts[static_cast<std::size_t>(CatalogField::Bp)] ==
          null_bp_candidates);
    CHECK(null_bp_candidates > 20);
    settings.null_counts_over_all_rows = true;

    const CatalogScan from_gz = scanCatalogs({gz_path}, settings);
    checkSameRows(from_gz.candidates, expected);
    CHECK(from_gz.totals == scan.totals);

    settings.block_bytes = std::size_t{8} << 20;
    checkSameRows(scanCatalogs({path}, settings).candidates, expected);
}

TEST_CASE("every read path gives the reference rows: mapped, gzip-streamed, bzip2, split across threads") {
    // The paths of FitsCatalog.cpp: uncompressed data through memory-mapped windows (one thread, or row
    // ranges on several), gzip inflated block by block after the headers were parsed from the stream,
    // and other compressed forms through cfitsio. All must equal cfitsio's column-by-column read.
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("two.fits");
    FixtureTable first = mixedTypeTable(900, 21);
    first.extname = "FIRST";
    FixtureTable second = mixedTypeTable(2500, 22);
    second.extname = "SECOND";
    writeFitsTables(path, {first, second});
    const std::string gz_path = directory.file("two.fits.gz");
    gzipFile(path, gz_path);
    const std::string bz2_path = directory.file("two.fits.bz2");
    runReferencePython("bzip2_file.py", "'" + path + "' '" + bz2_path + "'");
    // The HDU list of the gzip copy, parsed from the stream, equals cfitsio's list of the plain file.
    const std::vector<HduSummary> hdus = listHdus(path);
    REQUIRE(hdus.size() == 3);
    CHECK(hdus[2].name == "SECOND");
    CHECK(hdus[2].rows == 2500);
    CHECK(listHdus(gz_path) == hdus);
    CHECK(listHdus(bz2_path) == hdus);

    for (const auto& [hdu, all_row_nulls] :
         std::vector<std::pair<std::string, bool>>{{"", true}, {"2", true}, {"second", false}}) {
        CAPTURE(hdu);
        ScanSettings settings;
        settings.hdu = hdu;
        settings.null_counts_over_all_rows = all_row_nulls;
        settings.min_parallax_mas = 5.0;
        settings.block_bytes = 1000; // ~8 rows per block: many blocks, slices and a short last one
        settings.threads = 1;
        const CatalogScan plain = scanCatalogs({path}, settings);
        const FileScanReport& report = plain.files[0];
        CHECK(report.hdu_index == (hdu.empty() ? 1 : 2));
        const std::vector<CatalogRow> all = readCatalogReference(report, 0);
        const std::vector<CatalogRow> expected = referenceCandidates(all, settings);
        CHECK(expected.size() > 100);
        checkSameRows(plain.candidates, expected);

        settings.threads = 2; // one file: row ranges on two threads
        const CatalogScan split = scanCatalogs({path}, settings);
        checkSameRows(split.candidates, expected);
        CHECK(split.totals == plain.totals);
        CHECK(split.files[0].null_counts == report.null_counts);
        CHECK(split.files[0].parallax_min_mas == report.parallax_min_mas);
        CHECK(split.files[0].parallax_max_mas == report.parallax_max_mas);

        for (const std::string& compressed : {gz_path, bz2_path}) {
            CAPTURE(compressed);
            const CatalogScan unpacked = scanCatalogs({compressed}, settings);
            CHECK(unpacked.files[0].hdu_index == report.hdu_index);
            CHECK(unpacked.files[0].hdu_name == report.hdu_name);
            checkSameRows(unpacked.candidates, expected);
            CHECK(unpacked.totals == plain.totals);
            CHECK(unpacked.files[0].null_counts == report.null_counts);
        }
    }
    // A gzip file without the table asked for: cfitsio is given the inflated file and the usual message
    // follows.
    ScanSettings missing;
    missing.hdu = "THIRD";
    CHECK(inputErrorOf([&] { scanCatalogs({gz_path}, missing); }) ==
          gz_path + ": --hdu THIRD: no binary table with EXTNAME THIRD");
}

TEST_CASE("progress counters follow the rows and files of a scan") {
    const ScratchDirectory directory("starcensus-reader");
    const std::vector<std::string> paths = {directory.file("a.fits"), directory.file("b.fits")};
    writeFitsTable(paths[0], mixedTypeTable(700, 1));
    writeFitsTable(paths[1], mixedTypeTable(300, 2));
    starcensus::ProgressCounters progress;
    ScanSettings settings = everything();
    settings.block_bytes = 4096;
    settings.progress = &progress;
    scanCatalogs(paths, settings);
    CHECK(progress.items_done == 1000);
    CHECK(progress.items_total == 1000);
    CHECK(progress.parts_done == 2);
    CHECK(progress.parts_total == 2);
}

TEST_CASE("a parallel scan of several files equals the sequential scan, in file order") {
    const ScratchDirectory directory("starcensus-reader");
    std::vector<std::string> paths;
    for (std::uint64_t seed = 1; seed <= 5; ++seed) {
        paths.push_back(directory.file("part" + std::to_string(seed) + ".fits"));
        writeFitsTable(paths.back(), mixedTypeTable(400 + 100 * seed, seed));
    }
    ScanSettings settings;
    settings.min_parallax_mas = 2.0;
    settings.block_bytes = 4096;
    settings.threads = 1;
    const CatalogScan sequential = scanCatalogs(paths, settings);
    settings.threads = 3;
    const CatalogScan parallel = scanCatalogs(paths, settings);
    checkSameRows(parallel.candidates, sequential.candidates);
    CHECK(parallel.totals == sequential.totals);
    REQUIRE(parallel.files.size() == 5);
    CHECK(parallel.files[4].path == paths[4]);
    CHECK(parallel.candidates.back().file_index == 4);
    CHECK(parallel.totals.rows_read == 400 * 5 + 100 * 15);
}

TEST_CASE("the table is chosen by HDU index or EXTNAME") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("two.fits");
    FixtureTable second = smallGaiaTable();
    second.extname = "SECOND";
    second.columns[3].values = {1.0, 1.0, 1.0, 1.0};
    writeFitsTables(path, {smallGaiaTable(), second});
    auto scanHdu = [&](std::string hdu) {
        ScanSettings settings = everything();
        settings.hdu = std::move(hdu);
        return scanCatalogs({path}, settings);
    };
    CHECK(scanHdu("").files[0].hdu_index == 1);
    CHECK(scanHdu("2").candidates[0].parallax_mas == 1.0);
    const CatalogScan by_name = scanHdu("second");
    CHECK(by_name.files[0].hdu_index == 2);
    CHECK(by_name.files[0].hdu_name == "SECOND");
    CHECK(inputErrorOf([&] { scanHdu("0"); }) == path + ": --hdu 0 is an image, not a binary table");
    CHECK(inputErrorOf([&] { scanHdu("7"); }) == path + ": --hdu 7: the file has 3 HDUs (0 to 2)");
    CHECK(inputErrorOf([&] { scanHdu("THIRD"); }) ==
          path + ": --hdu THIRD: no binary table with EXTNAME THIRD");

    const std::vector<HduSummary> hdus = listHdus(path);
    REQUIRE(hdus.size() == 3);
    CHECK(hdus[0].type == "image");
    CHECK(hdus[0].image_shape == "none");
    CHECK(hdus[2].type == "binary table");
    CHECK(hdus[2].name == "SECOND");
    CHECK(hdus[2].rows == 4);
    CHECK(hdus[2].columns == 12);
}

TEST_CASE("bad FITS input gives one-line errors naming file, HDU, column and cause") {
    const ScratchDirectory directory("starcensus-reader");
    const ScanSettings settings = everything();
    auto scanError = [&](const std::string& path) {
        return inputErrorOf([&] { scanCatalogs({path}, settings); });
    };

    const std::string missing = directory.file("missing.fits");
    CHECK(scanError(missing) == missing + ": no such file");

    const std::string text = directory.file("notes.fits");
    writeText(text, "this is not a FITS file\n");
    CHECK(scanError(text).starts_with(text + ": cannot open as FITS: cfitsio status "));

    const std::string truncated = directory.file("truncated.fits");
    writeFitsTable(truncated, mixedTypeTable(2000, 3));
    std::filesystem::resize_file(truncated, std::filesystem::file_size(truncated) - 3 * 2880);
    const std::string truncated_error = scanError(truncated);
    CHECK(truncated_error.starts_with(truncated + " [HDU 1 MIXED]: cannot read rows"));
    CHECK(truncated_error.find(" to 2000 (truncated file?): the table needs ") != std::string::npos);
    const std::string truncated_gz = directory.file("truncated.fits.gz");
    gzipFile(truncated, truncated_gz);
    const std::string truncated_gz_error = scanError(truncated_gz);
    CHECK(truncated_gz_error.starts_with(truncated_gz + " [HDU 1 MIXED]: cannot read rows"));
    CHECK(truncated_gz_error.ends_with("(truncated file?): the gzip stream ends early"));
    // Gzip content that is not FITS, or a FITS file cut inside a header, is said without cfitsio, which
    // would first allocate the inflated size a damaged gzip trailer states (the fuzzer's slowest inputs).
    const std::string gzip_text = directory.file("notes.fits.gz");
    gzipFile(text, gzip_text);
    CHECK(scanError(gzip_text) ==
          gzip_text + ": not a FITS file: the gzip-compressed data do not start with a SIMPLE card");
    const std::string cut_header = directory.file("cut_header.fits");
    writeFitsTable(cut_header, mixedTypeTable(10, 1));
    std::filesystem::resize_file(cut_header, 2880 + 1000); // the primary header and part of the table's
    const std::string cut_header_gz = directory.file("cut_header.fits.gz");
    gzipFile(cut_header, cut_header_gz);
    const std::string expected_cut =
        cut_header_gz + ": the gzip-compressed FITS data end inside HDU 1 (truncated file?)";
    CHECK(scanError(cut_header_gz) == expected_cut);
    CHECK(inputErrorOf([&] { listHdus(cut_header_gz); }) == expected_cut);

    const std::string no_parallax = directory.file("noplx.fits");
    writeFitsTable(no_parallax,
                   {"", {valueColumn("e_plx", "1D", "mas", {1.0}), valueColumn("gmag", "1D", "mag", {1.0})}});
    CHECK(scanError(no_parallax).starts_with(no_parallax + " [HDU 1]: no column for parallax"));

    const std::string as_text = directory.file("textplx.fits");
    FixtureColumn text_parallax = makeColumn("parallax", "8A", "mas");
    text_parallax.texts = {"12.5"};
    writeFitsTable(as_text, {"",
                             {text_parallax, valueColumn("parallax_error", "1D", "mas", {1.0}),
                              valueColumn("gmag", "1D", "mag", {1.0})}});
    CHECK(scanError(as_text) == as_text + " [HDU 1]: column parallax (parallax) is not numeric (TFORM 8A)");

    const std::string vector_parallax = directory.file("vecplx.fits");
    writeFitsTable(vector_parallax, {"",
                                     {valueColumn("parallax", "2D", "mas", {1.0, 2.0}),
                                      valueColumn("parallax_error", "1D", "mas", {1.0}),
                                      valueColumn("gmag", "1D", "mag", {1.0})}});
    CHECK(scanError(vector_parallax).find("column parallax (parallax) has TFORM 2D; only scalar numeric") !=
          std::string::npos);

    const std::string degrees = directory.file("degplx.fits");
    writeFitsTable(degrees, {"",
                             {valueColumn("parallax", "1D", "deg", {1.0}),
                              valueColumn("parallax_error", "1D", "mas", {1.0}),
                              valueColumn("gmag", "1D", "mag", {1.0})}});
    CHECK(scanError(degrees).starts_with(
        degrees + " [HDU 1]: column parallax (parallax) has unit 'deg'; accepted: mas"));

    const std::string no_unit = directory.file("nounit.fits");
    writeFitsTable(no_unit, {"",
                             {valueColumn("parallax", "1D", "", {1.0}),
                              valueColumn("parallax_error", "1D", "mas", {1.0}),
                              valueColumn("gmag", "1D", "mag", {1.0})}});
    CHECK(scanError(no_unit).starts_with(no_unit +
                                         " [HDU 1]: column parallax (parallax) has no unit; state it with "
                                         "TUNIT1 or --unit parallax=UNIT"));

    const std::string ambiguous = directory.file("ambiguous.fits");
    writeFitsTable(
        ambiguous,
        {"",
         {valueColumn("parallax", "1D", "mas", {1.0}), valueColumn("parallax_error", "1D", "mas", {1.0}),
          valueColumn("gmag", "1D", "mag", {1.0}), valueColumn("G_MAG", "1D", "mag", {1.0})}});
    CHECK(scanError(ambiguous) == ambiguous +
                                      " [HDU 1]: field g is ambiguous: columns gmag (name gmag), G_MAG (name "
                                      "G_MAG) all match; choose one with --column g=COLUMN");

    // A TTYPE value of 71 unquoted bytes, as
    // fuzz/corpus/fits_reader_fuzz/unquoted_ttype_cfitsio_overflow.fits has: cfitsio 4.2.0 would overflow its
    // 70-byte column name (SIGABRT), so the header check refuses it first, in the plain file and in its gzip
    // copy (FITS Standard 4.0, section 4.2.1: quoted strings).
    for (const std::string& path :
         tableWithDamagedCard(directory.file("unquoted.fits"), "TTYPE2  = ", 0, 9, std::string(71, 'x'))) {
        CHECK(scanError(path) == path +
                                     ": HDU 1: header card TTYPE2 has a value that is not a quoted string, "
                                     "which FITS requires (FITS Standard 4.0, section 4.2.1); the file is "
                                     "damaged or was not written as FITS");
        CHECK(inputErrorOf([&] { listHdus(path); }).starts_with(path + ": HDU 1: header card TTYPE2"));
    }

    // NAXIS beyond FITS's 999 (FITS Standard 4.0, section 4.4.1.1) in a table's header, as a fuzzed gzip
    // file had: a one-line error instead of an escaping std::length_error from sizing the axes.
    for (const std::string& path : tableWithDamagedCard(directory.file("many_axes.fits"), "NAXIS   = ", 2880,
                                                        9, "         999999999999")) {
        CHECK(inputErrorOf([&] { listHdus(path); }) ==
              path + ": HDU 1: header card NAXIS = 999999999999 is outside 0-999, which FITS requires (FITS "
                     "Standard 4.0, section 4.4.1.1); the file is damaged or not FITS");
    }

    // A numeric keyword holding a long string, or text that is no number: cfitsio 4.2.0 would overflow its
    // message buffer converting it (SIGABRT), so the header check refuses it first (FITS Standard 4.0,
    // sections 4.2.3-4.2.4: integers and reals). A number it can read stays a number.
    for (const std::string& value :
         {"'" + std::string(40, 'x') + "'", std::string(30, 'a'), std::string("T")}) {
        for (const std::string& path : tableWithDamagedCard(directory.file("text_naxis1.fits"),
                                                            "NAXIS1  = ", 2880, 9, value + "   /")) {
            CHECK(scanError(path) ==
                  path + ": HDU 1: header card NAXIS1 has a value that is not a number, which "
                         "FITS requires (FITS Standard 4.0, sections 4.2.3 and 4.2.4); the "
                         "file is damaged or was not written as FITS");
        }
    }
    for (const std::string& path : tableWithDamagedCard(directory.file("signed_naxis1.fits"),
                                                        "NAXIS1  = ", 2880, 9, "         +000000000016")) {
        CHECK(scanCatalogs({path}, settings).totals.rows_read == 1);
    }
    // A space inside a keyword cfitsio reads (FITS Standard 4.0, section 4.1.2.1 forbids it), as the fuzzed
    // fuzz/corpus/fits_reader_fuzz/spaced_keyword_cfitsio_overflow.fits.gz has: cfitsio would take the card
    // for NAXIS1 and overflow converting its value.
    for (const std::string& path :
         tableWithDamagedCard(directory.file("spaced_naxis1.fits"), "NAXIS1  = ", 2880, 6, " x =")) {
        CHECK(inputErrorOf([&] { listHdus(path); }) ==
              path +
                  ": HDU 1: header card 'NAXIS1 x' has a space or '=' inside its keyword, which FITS forbids "
                  "(FITS Standard 4.0, section 4.1.2.1); the file is damaged or was not written as FITS");
    }
    // An '=' further along a card whose name cfitsio reads as NAXIS1 (up to its first space), as the fuzzed
    // fuzz/corpus/fits_reader_fuzz/late_value_indicator_cfitsio_overflow.fits.gz has: cfitsio takes the
    // text after it for the value (its form for keywords longer than eight characters) and overflows.
    for (const std::string& path : tableWithDamagedCard(directory.file("late_equals_naxis1.fits"),
                                                        "NAXIS1  = ", 2880, 8, " x = 'text'")) {
        CHECK(
            inputErrorOf([&] { listHdus(path); }) ==
            path +
                ": HDU 1: header card NAXIS1 has its value indicator '=' elsewhere than in column 9, which "
                "FITS requires (FITS Standard 4.0, section 4.1.2.2); the file is damaged or was not written "
                "as FITS");
    }

    // The first failing file in input order is the one reported.
    CHECK(inputErrorOf([&] { scanCatalogs({no_parallax, missing}, settings); }).starts_with(no_parallax));
}

TEST_CASE("empty tables, missing and negative parallaxes and all-null photometry are counted, not thrown") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string empty = directory.file("empty.fits");
    writeFitsTable(empty,
                   {"EMPTY",
                    {valueColumn("parallax", "1D", "mas", {}), valueColumn("parallax_error", "1D", "mas", {}),
                     valueColumn("gmag", "1D", "mag", {})}});
    const std::string odd = directory.file("odd.fits");
    writeFitsTable(odd, {"",
                         {valueColumn("parallax", "1D", "mas", {kNaN, -3.0, 0.0, 4.0, -50.0, 2.0}),
                          valueColumn("parallax_error", "1D", "mas", {1.0, 1.5, 1.0, kNaN, 1.0, -1.0}),
                          valueColumn("gmag", "1D", "mag", {10.0, 11.0, 12.0, 13.0, 14.0, 15.0}),
                          valueColumn("bpmag", "1D", "mag", {kNaN, kNaN, kNaN, kNaN, kNaN, kNaN})}});
    ScanSettings settings;
    settings.min_parallax_mas = 1.0;
    const CatalogScan scan = scanCatalogs({empty, odd}, settings);
    CHECK(scan.files[0].rows == 0);
    REQUIRE(scan.files[0].warnings.size() == 1);
    CHECK(scan.files[0].warnings[0] == empty + " [HDU 1 EMPTY]: the table has zero rows; no candidates");

    // -3 + 3 * 1.5 = 1.5 > 1 is kept; 0 + 3 = 3 is kept; -50 fails; NaN parallax and NaN / negative errors
    // are skipped.
    const ScanCounts expected{.rows_read = 6,
                              .rows_no_parallax = 1,
                              .rows_unusable_parallax_error = 2,
                              .rows_below_parallax_limit = 1,
                              .rows_nonpositive_parallax = 3,
                              .candidates = 2,
                              .candidates_nonpositive_parallax = 2,
                              .candidates_missing_bp = 2,
                              .candidates_missing_rp = 2,
                              .candidates_missing_j = 2,
                              .candidates_missing_h = 2,
                              .candidates_missing_ks = 2};
    CHECK(scan.totals == expected);
    REQUIRE(scan.candidates.size() == 2);
    CHECK(scan.candidates[0].parallax_mas == -3.0);
    CHECK(scan.candidates[1].parallax_mas == 0.0);
    CHECK(scan.candidates[1].file_index == 1);
    REQUIRE(scan.files[1].warnings.size() == 1);
    CHECK(scan.files[1].warnings[0] == odd + " [HDU 1]: column bpmag (bp) is null in every candidate");
    CHECK(scan.files[1].parallax_min_mas == -50.0);
    settings.null_counts_over_all_rows = true;
    const CatalogScan all_rows = scanCatalogs({odd}, settings);
    REQUIRE(all_rows.files[0].warnings.size() == 1);
    CHECK(all_rows.files[0].warnings[0] == odd + " [HDU 1]: column bpmag (bp) is null in every row");
}

TEST_CASE("inspect reports HDUs, mapping routes, units, null counts and the parallax range") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("gaia.fits");
    writeFitsTable(path, smallGaiaTable());
    const std::string missing = directory.file("none.fits");
    ScanSettings settings;
    settings.min_parallax_mas = 1.0;
    const auto inspections = inspectCatalogs({path, missing}, settings);
    REQUIRE(inspections.size() == 2);
    CHECK(inspections[0].error.empty());
    CHECK(inspections[0].hdus.size() == 2);
    CHECK(inspections[0].scan.counts.candidates == 3);
    CHECK(inspections[1].error == missing + ": no such file");
    const std::string text = formatInspection(inspections);
    CHECK(text.find("    1  binary table  GAIA  4 rows, 12 columns") != std::string::npos);
    CHECK(text.find(
              "    4   parallax                     number  1E     mas     -    1      -0.5 to 100.5\n") !=
          std::string::npos);
    CHECK(text.find(
              "    parallax        parallax                     name   mas (TUNIT4)             1      name "
              "parallax\n") != std::string::npos);
    CHECK(text.find("    g_error         phot_g_mean_flux_over_error  name   flux/error -> mag error  1") !=
          std::string::npos);
    CHECK(text.find(
              "    bp_error        none                         -      -                        -      no "
              "candidate\n") != std::string::npos);
    CHECK(text.find("  parallax range: -0.5 to 100.5 mas") != std::string::npos);
    CHECK(text.find("  error: " + missing + ": no such file") != std::string::npos);
}

TEST_CASE("a terminal progress display ends with its owner") {
    // Enabled, the display's thread runs; construction and destruction return promptly (a stop request
    // wakes the thread).
    starcensus::ProgressCounters counters;
    counters.items_total = 10;
    const auto start = std::chrono::steady_clock::now();
    {
        const starcensus::TerminalProgress display("test", "rows", counters, true,
                                                   std::chrono::milliseconds(5));
        counters.items_done = 10;
        std::this_thread::sleep_for(std::chrono::milliseconds(20));
    }
    CHECK(std::chrono::steady_clock::now() - start < std::chrono::seconds(5));
}

TEST_CASE("a FITS character column of spectral types is parsed for candidates, on every read path") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("types.fits");
    FixtureTable table = smallGaiaTable();
    FixtureColumn types = makeColumn("TYPE", "10A", "", "src.spType");
    // Row 3 has no parallax, so it is never a candidate and its string is never parsed.
    types.texts = {"M4.5 V", "DA7.8", "", "   "};
    table.columns.push_back(types);
    writeFitsTable(path, table);
    const std::string gz_path = directory.file("types.fits.gz");
    gzipFile(path, gz_path);

    const ScanSettings settings = everything();
    const CatalogScan scan = scanCatalogs({path}, settings);
    const FileScanReport& report = scan.files[0];
    CHECK(report.mapping[CatalogField::SpectralType]->route == MappingRoute::Ucd);
    REQUIRE(scan.candidates.size() == 3);
    CHECK(scan.candidates[0].literature_status == LiteratureTypeStatus::Parsed);
    CHECK(scan.candidates[0].literature_class == StellarClass::M);
    CHECK(scan.candidates[0].literature_code == 64.5); // M0 = 60 (SpectralType.h)
    CHECK(scan.candidates[1].literature_class == StellarClass::WhiteDwarf);
    CHECK(std::isnan(scan.candidates[1].literature_code));
    CHECK(scan.candidates[2].literature_status == LiteratureTypeStatus::Absent);
    CHECK(std::isnan(scan.candidates[2].literature_code));
    CHECK(report.null_counts[static_cast<std::size_t>(CatalogField::SpectralType)] == 2); // all rows
    checkSameRows(scan.candidates, referenceCandidates(readCatalogReference(report, 0), settings));
    checkSameRows(scanCatalogs({gz_path}, settings).candidates, scan.candidates);

    ScanSettings candidates_only = settings;
    candidates_only.null_counts_over_all_rows = false;
    const CatalogScan counted = scanCatalogs({path}, candidates_only);
    CHECK(counted.files[0].null_counts[static_cast<std::size_t>(CatalogField::SpectralType)] == 1);
    checkSameRows(counted.candidates, scan.candidates);

    const std::string text = formatInspection(inspectCatalogs({path}, settings));
    CHECK(text.find("    spectral_type   TYPE                         UCD    - (none)") != std::string::npos);
}

TEST_CASE("spectral_type needs a character column and numeric fields refuse one") {
    const ScratchDirectory directory("starcensus-reader");
    const std::string path = directory.file("types.fits");
    FixtureTable table = smallGaiaTable();
    FixtureColumn types = makeColumn("SPT", "6A");
    types.texts = {"M4.5 V", "DA7.8", "", "K2"};
    table.columns.push_back(types);
    writeFitsTable(path, table);
    ScanSettings settings = everything();
    settings.user_columns = {{"spectral_type", "RUWE"}}; // unitless, so the type is what is refused
    CHECK(inputErrorOf([&] { scanCatalogs({path}, settings); }) ==
          path + " [HDU 1 GAIA]: column ruwe (spectral_type) is not a character column (TFORM 1E); a "
                 "spectral type must be text, TFORM rA");
    // A column with a unit is refused for its unit before its type is looked at.
    settings.user_columns = {{"spectral_type", "PARALLAX"}};
    CHECK(inputErrorOf([&] { scanCatalogs({path}, settings); }) ==
          path + " [HDU 1 GAIA]: column parallax (spectral_type) has unit 'mas'; accepted: none");
    settings.user_columns = {{"g", "spt"}};
    CHECK(inputErrorOf([&] { scanCatalogs({path}, settings); }) ==
          path + " [HDU 1 GAIA]: column SPT (g) is not numeric (TFORM 6A)");
}

TEST_CASE("a file truncated by another program while its mapped windows are scanned: one InputError, no "
          "SIGBUS") {
    const ScratchDirectory directory("starcensus-reader-shrink");
    const std::string path = directory.file("shrinking.fits");
    writeFitsTable(path, mixedTypeTable(400000, 11));
    ScanSettings settings = everything();
    settings.min_parallax_mas = 1e9; // nothing kept: the scan only decodes and counts
    settings.threads = 1;
    settings.block_bytes = std::size_t{16} << 10; // hundreds of windows
    starcensus::ProgressCounters progress;
    settings.progress = &progress;
    // As soon as the first window is done, cut the file in half: the windows beyond the new end raise
    // SIGBUS at their first touch.
    const auto half_bytes = std::filesystem::file_size(path) / 2;
    std::atomic<bool> scan_over{false};
    std::thread truncate([&] {
        while (progress.items_done.load() == 0 && !scan_over.load()) {
            std::this_thread::yield();
        }
        std::filesystem::resize_file(path, half_bytes);
    });
    const std::string error = inputErrorOf([&] { scanCatalogs({path}, settings); });
    scan_over = true;
    truncate.join();
    CHECK(error.starts_with(path + " [HDU 1 MIXED]: cannot read rows "));
    CHECK(error.ends_with(": the file was truncated while it was read (SIGBUS on its memory map)"));
    // Scanned again, the short file is refused before any window is mapped.
    const std::string again = inputErrorOf([&] { scanCatalogs({path}, settings); });
    CHECK(again.starts_with(path + " [HDU 1 MIXED]: cannot read rows "));
    CHECK(again.find("(truncated file?): the table needs ") != std::string::npos);
}
