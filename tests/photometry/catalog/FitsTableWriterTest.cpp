#include "photometry/catalog/FitsTableWriter.h"

#include "photometry/base/InputError.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <cmath>
#include <limits>

using namespace starcensus::photometry;
using starcensus::testing::runReferencePython;
using starcensus::testing::ScratchDirectory;

namespace {

std::vector<FitsColumn> allTypeColumns() {
    return {
        {"source_id", FitsColumnType::Int64, "", "meta.id;meta.main", "unique source identifier", 0,
         std::numeric_limits<std::int64_t>::min()},
        {"parallax", FitsColumnType::Float64, "mas", "pos.parallax.trig", "trigonometric parallax", 0, {}},
        {"flux_ratio", FitsColumnType::Float32, "", "phot.flux;arith.ratio", "a 32-bit float column", 0, {}},
        {"count32", FitsColumnType::Int32, "", "meta.number", "a 32-bit integer column", 0, {}},
        {"count16", FitsColumnType::Int16, "", "meta.number", "a 16-bit integer column", 0, -1},
        {"class_code", FitsColumnType::UInt8, "", "src.class", "an unsigned byte column", 0, {}},
        {"is_binary", FitsColumnType::Logical, "", "meta.code.multip", "a logical column", 0, {}},
        {"label",
         FitsColumnType::String,
         "",
         "meta.note",
         "a fixed-width string column whose description is long enough to need the FITS long-string "
         "convention",
         6,
         {}},
    };
}

void fillRows(FitsRowBlock& block, int first, int count) {
    for (int i = first; i < first + count; ++i) {
        block.values<std::int64_t>(0).push_back(i == 1 ? std::numeric_limits<std::int64_t>::min()
                                                       : 1000000000000LL + i);
        block.values<double>(1).push_back(i == 2 ? std::nan("") : 100.0 / (i + 1));
        block.values<float>(2).push_back(0.5f * static_cast<float>(i));
        block.values<std::int32_t>(3).push_back(-i * 1000);
        block.values<std::int16_t>(4).push_back(static_cast<std::int16_t>(i));
        block.values<std::uint8_t>(5).push_back(static_cast<std::uint8_t>(200 + i));
        block.values<bool>(6).push_back(i % 2 == 0);
        block.values<std::string>(7).push_back("row" + std::to_string(i));
    }
}

} // namespace

TEST_CASE("FITS binary table round trip through astropy: values, units, UCDs, descriptions, keywords") {
    ScratchDirectory scratch("starcensus-fits-writer");
    const auto path = scratch.path() / "table.fits";
    {
        FitsTableWriter writer(path, "MOCKTEST", allTypeColumns(),
                               {{"ORIGIN", std::string("starcensus test"), "who wrote it"},
                                {"RADIUS", 25.5, "radius in pc"},
                                {"SEED", std::int64_t{42}, "random seed"}});
        FitsRowBlock block = writer.makeBlock();
        fillRows(block, 0, 3); // appended in two blocks to exercise chunked writing
        writer.append(block);
        block.clear();
        fillRows(block, 3, 2);
        writer.append(block);
        CHECK(writer.rowCount() == 5);
        CHECK_FALSE(std::filesystem::exists(path)); // only the temporary file exists before finish()
        writer.finish();
    }
    REQUIRE(std::filesystem::exists(path));

    const auto dump = nlohmann::json::parse(
        runReferencePython("dump_fits_table.py", path.string() + " ORIGIN RADIUS SEED"));
    CHECK(dump["hdu_count"] == 2);
    CHECK(dump["primary_has_data"] == false);
    CHECK(dump["xtension"] == "BINTABLE");
    CHECK(dump["extname"] == "MOCKTEST");
    CHECK(dump["rows"] == 5);
    CHECK(dump["keywords"]["ORIGIN"] == "starcensus test");
    CHECK(dump["keywords"]["RADIUS"].get<double>() == doctest::Approx(25.5));
    CHECK(dump["keywords"]["SEED"] == 42);

    const auto& columns = dump["columns"];
    REQUIRE(columns.size() == 8);
    const std::vector<std::string> formats = {"1K", "1D", "1E", "1J", "1I", "1B", "1L", "6A"};
    const auto expected = allTypeColumns();
    for (std::size_t c = 0; c < columns.size(); ++c) {
        CAPTURE(c);
        CHECK(columns[c]["name"] == expected[c].name);
        CHECK(columns[c]["format"] == formats[c]);
        CHECK(columns[c]["ucd"] == expected[c].ucd);
        CHECK(columns[c]["comment"] == expected[c].description);
    }
    CHECK(columns[1]["unit"] == "mas");

    // Values as astropy reads them; TNULL-flagged integers come back masked, NaN as NaN.
    CHECK(columns[0]["values"][0] == 1000000000000LL);
    CHECK(columns[0]["values"][1].is_null());
    CHECK(columns[0]["values"][4] == 1000000000004LL);
    CHECK(columns[1]["values"][0].get<double>() == 100.0);
    CHECK(columns[1]["values"][2] == "NaN");
    CHECK(columns[1]["values"][4].get<double>() == 20.0);
    CHECK(columns[2]["values"][3].get<double>() == 1.5);
    CHECK(columns[3]["values"][4] == -4000);
    CHECK(columns[4]["values"][3] == 3);
    CHECK(columns[5]["values"][4] == 204);
    CHECK(columns[6]["values"][0] == true);
    CHECK(columns[6]["values"][1] == false);
    CHECK(columns[7]["values"][3] == "row3");
}

TEST_CASE("a block of many writes reads back whole through astropy, strings cut at their width") {
    // Rows of this layout take 34 bytes, so the writer's ~1 MiB writes hold 30,840 rows: 70,000 rows in
    // one block take three writes. Labels "row1000" and longer are cut to the column's 6 characters, as
    // FITS fixed-width strings are (FITS Standard 4.0, 7.3.3.1).
    ScratchDirectory scratch("starcensus-fits-writer-long");
    const auto path = scratch.path() / "long.fits";
    constexpr int kRows = 70000;
    {
        FitsTableWriter writer(path, "LONG", allTypeColumns());
        FitsRowBlock block = writer.makeBlock();
        fillRows(block, 0, kRows);
        writer.append(block);
        writer.finish();
    }
    const auto dump = nlohmann::json::parse(runReferencePython("dump_fits_table.py", path.string()));
    REQUIRE(dump["rows"] == kRows);
    const auto& columns = dump["columns"];
    for (const int row : {0, 30839, 30840, 30841, 61680, kRows - 1}) {
        CAPTURE(row);
        const auto r = static_cast<std::size_t>(row);
        if (row != 1) {
            CHECK(columns[0]["values"][r] == 1000000000000LL + row);
        }
        CHECK(columns[2]["values"][r].get<double>() == 0.5 * row);
        CHECK(columns[3]["values"][r] == -row * 1000);
        CHECK(columns[6]["values"][r] == (row % 2 == 0));
        CHECK(columns[7]["values"][r] == ("row" + std::to_string(row)).substr(0, 6));
    }
}

TEST_CASE("FITS writer errors name the file, and leave nothing behind") {
    ScratchDirectory scratch("starcensus-fits-writer-errors");
    const auto missing_directory = scratch.path() / "no-such-directory" / "table.fits";
    try {
        FitsTableWriter writer(missing_directory, "T", allTypeColumns());
        FAIL("expected an InputError");
    } catch (const starcensus::InputError& error) {
        CHECK(std::string(error.what()).find(missing_directory.string()) != std::string::npos);
    }

    const auto abandoned = scratch.path() / "abandoned.fits";
    {
        FitsTableWriter writer(abandoned, "T", allTypeColumns());
        FitsRowBlock block = writer.makeBlock();
        fillRows(block, 0, 2);
        writer.append(block);
        block.values<double>(1).pop_back(); // ragged block: a programming error, not input
        CHECK_THROWS_AS(writer.append(block), std::invalid_argument);
    } // destroyed without finish()
    CHECK(std::filesystem::is_empty(scratch.path()));

    CHECK_THROWS_AS(FitsTableWriter(scratch.path() / "bad.fits", "T",
                                    {{"a", FitsColumnType::Float64, "", "", "", 0, {}},
                                     {"a", FitsColumnType::Float64, "", "", "", 0, {}}}),
                    std::invalid_argument);
}
