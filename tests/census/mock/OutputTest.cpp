#include "census/mock/Output.h"

#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <iterator>

using namespace starcensus::census;
using namespace starcensus::census::mock;
using starcensus::testing::runReferencePython;
using starcensus::testing::ScratchDirectory;

namespace {

std::string fileBytes(const std::filesystem::path& path) {
    std::ifstream stream(path, std::ios::binary);
    return {std::istreambuf_iterator<char>(stream), std::istreambuf_iterator<char>()};
}

MockSettings smallSettings() {
    MockSettings settings;
    settings.radius_max_pc = 8.0;
    return settings;
}

} // namespace

TEST_CASE("mock catalog FITS file reads back in astropy with Gaia archive names, units and UCDs") {
    ScratchDirectory scratch("starcensus-mock-output");
    const MockResult result = simulateNeighbourhood(smallSettings(), 99);
    REQUIRE(result.catalog.size() > 50);
    const auto path = scratch.path() / "mock.fits";
    writeMockCatalog(path, result);

    const auto dump = nlohmann::json::parse(
        runReferencePython("dump_fits_table.py", path.string() + " ORIGIN MOCKSEED IMF"));
    CHECK(dump["rows"] == result.catalog.size());
    CHECK(dump["keywords"]["MOCKSEED"] == 99);
    CHECK(dump["keywords"]["IMF"] == "kroupa");
    std::map<std::string, nlohmann::json> columns;
    for (const auto& column : dump["columns"]) {
        columns[column["name"]] = column;
    }
    // Units as astropy parses them, UCDs as written (Gaia DR3 gaia_source conventions).
    CHECK(columns["parallax"]["unit"] == "mas");
    CHECK(columns["pmra"]["unit"] == "mas / yr");
    CHECK(columns["ra"]["unit"] == "deg");
    CHECK(columns["phot_g_mean_mag"]["unit"] == "mag");
    CHECK(columns["parallax"]["ucd"] == "pos.parallax.trig");
    CHECK(columns["source_id"]["ucd"] == "meta.id;meta.main");
    CHECK(columns["source_id"]["format"] == "1K");
    CHECK(columns["parallax_error"]["format"] == "1E");
    CHECK(columns["ks_m"]["ucd"] == "phot.mag;em.IR.K");

    for (std::size_t i : {std::size_t{0}, result.catalog.size() / 2, result.catalog.size() - 1}) {
        const auto& row = result.catalog[i];
        CAPTURE(i);
        CHECK(columns["source_id"]["values"][i] == row.source_id);
        CHECK(columns["parallax"]["values"][i].get<double>() == row.parallax_mas);
        CHECK(columns["phot_g_mean_mag"]["values"][i].get<double>() ==
              doctest::Approx(row.g_mag).epsilon(1e-7));
        // flux_over_error = (2.5 / ln 10) / sigma_mag
        CHECK(columns["phot_g_mean_flux_over_error"]["values"][i].get<double>() ==
              doctest::Approx(2.5 / std::log(10.0) / row.g_error_mag).epsilon(1e-6));
    }
    // Missing values come back as NaN.
    std::size_t missing_bp = 0;
    for (std::size_t i = 0; i < result.catalog.size(); ++i) {
        if (std::isnan(result.catalog[i].bp_mag)) {
            ++missing_bp;
            CHECK(columns["phot_bp_mean_mag"]["values"][i] == "NaN");
        }
    }
    CHECK(missing_bp > 0);
}

TEST_CASE("streamed catalog is byte-identical to the one written from the full result") {
    ScratchDirectory scratch("starcensus-mock-stream");
    const MockResult result = simulateNeighbourhood(smallSettings(), 5);
    writeMockCatalog(scratch.path() / "whole.fits", result);
    const std::vector<double> radii = {4.0, 8.0};
    const MockStreamSummary summary =
        streamMockCatalog(scratch.path() / "streamed.fits", smallSettings(), 5, radii, 13);
    CHECK(summary.objects == static_cast<std::int64_t>(result.truth.size()));
    CHECK(summary.catalogued == static_cast<std::int64_t>(result.catalog.size()));
    const auto counts = countWithinRadii(result.truth, radii);
    CHECK(summary.counts[1].all == counts[1].all);
    CHECK(summary.counts[0].components == counts[0].components);
    CHECK(fileBytes(scratch.path() / "whole.fits") == fileBytes(scratch.path() / "streamed.fits"));
}

TEST_CASE("truth JSON: settings, seed, counts per class within radii, one record per object") {
    ScratchDirectory scratch("starcensus-mock-truth");
    const MockResult result = simulateNeighbourhood(smallSettings(), 3);
    const std::vector<double> radii = {5.0, 8.0};
    const auto path = scratch.path() / "truth.json";
    writeMockTruth(path, result, radii);
    const auto truth = nlohmann::json::parse(fileBytes(path));
    CHECK(truth["seed"] == 3);
    CHECK(truth["settings"]["radius_max_pc"] == 8.0);
    CHECK(truth["settings"]["imf"]["family"] == "kroupa");
    REQUIRE(truth["objects"].size() == result.truth.size());
    CHECK(truth["objects_total"] == result.truth.size());
    CHECK(truth["catalogued_total"] == result.catalog.size());
    const auto& within_8 = truth["counts_within_radius"][1];
    CHECK(within_8["radius_pc"] == 8.0);
    CHECK(within_8["objects"]["total"] == result.truth.size());
    CHECK(within_8["catalogued"]["total"] == result.catalog.size());
    std::int64_t m_dwarfs = 0;
    for (const auto& object : truth["objects"]) {
        m_dwarfs += object["class"] == "M" ? 1 : 0;
    }
    CHECK(within_8["objects"]["M"] == m_dwarfs);
    const auto& first = truth["objects"][0];
    CHECK(first["source_id"] == result.truth[0].source_id);
    CHECK(first["distance_pc"].get<double>() == result.truth[0].distance_pc);
    // A white dwarf has no dwarf spectral code: null, not NaN.
    for (std::size_t i = 0; i < result.truth.size(); ++i) {
        if (result.truth[i].stage == MockStage::WhiteDwarf) {
            CHECK(truth["objects"][i]["spectral_code"].is_null());
            CHECK(truth["objects"][i]["stage"] == "white_dwarf");
            break;
        }
    }
}
