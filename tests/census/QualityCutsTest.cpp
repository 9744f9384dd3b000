#include "census/QualityCuts.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus;

TEST_CASE("quality cuts remove high-RUWE rows, drop noisy colours and count low-S/N parallaxes") {
    std::vector<photometry::CatalogRow> rows(4);
    for (auto& row : rows) {
        row.parallax_mas = 100.0;
        row.parallax_error_mas = 1.0;
        row.bp_mag = 10.0;
        row.rp_mag = 9.0;
        row.bp_error_mag = 0.01;
        row.rp_error_mag = 0.01;
        row.ruwe = 1.0;
    }
    rows[0].ruwe = 2.5;                  // removed
    rows[1].ruwe = photometry::kMissing; // passes
    rows[2].rp_error_mag = 0.3;          // colour dropped
    rows[3].parallax_error_mas = 40.0;   // S/N 2.5: not classified
    census::QualitySettings settings;
    settings.max_ruwe = 2.0;
    const auto outcomes = census::applyQualityCuts(rows, settings);
    REQUIRE(outcomes.size() == 4);
    CHECK(outcomes[0].rows_affected == 1);
    CHECK(outcomes[1].rows_affected == 0); // the RUWE 2.5 row was removed before inflation
    CHECK(outcomes[2].rows_affected == 1);
    CHECK(outcomes[3].rows_affected == 1);
    CHECK(rows.size() == 3);
    CHECK(std::isnan(rows[1].bp_mag)); // rows[2] moved up after the removal
    CHECK(outcomes[0].description == "removed: RUWE > 2");
}

TEST_CASE("by default high-RUWE rows stay, with their parallax errors scaled by RUWE") {
    std::vector<photometry::CatalogRow> rows(2);
    rows[0].parallax_mas = 100.0;
    rows[0].parallax_error_mas = 0.1;
    rows[0].ruwe = 3.0;
    rows[1] = rows[0];
    rows[1].ruwe = 1.2;
    const auto outcomes = census::applyQualityCuts(rows, census::QualitySettings{});
    CHECK(rows.size() == 2);
    CHECK(outcomes[1].rows_affected == 1);
    CHECK(rows[0].parallax_error_mas == doctest::Approx(0.3));
    CHECK(rows[1].parallax_error_mas == doctest::Approx(0.1));
    CHECK(outcomes[0].description == "no rows removed by RUWE (--max-ruwe 0: off)");
}
