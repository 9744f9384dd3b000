#include "photometry/ModelPhotometry.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::photometry;

TEST_CASE("model photometry: brown-dwarf cooling and the locus mapping") {
    // Burrows et al. 2001 approximation (from memory): 1550 K at 0.05 Msun and 1 Gyr, t^-0.32.
    CHECK(brownDwarfTeffK(0.05, 1.0) == doctest::Approx(1550.0));
    CHECK(brownDwarfTeffK(0.05, 10.0) == doctest::Approx(1550.0 * std::pow(10.0, -0.32)));
    // Mass -> spectral code on the Pecaut & Mamajek locus: 1 Msun is an early G dwarf (the table gives
    // 1.0 Msun near G2V), 0.1 Msun a late M dwarf.
    const ShippedModelPhotometry photometry;
    CHECK(photometry.codeOfMass(1.0) > 40.0);
    CHECK(photometry.codeOfMass(1.0) < 45.0);
    CHECK(photometry.codeOfMass(0.1) > 60.0);
    CHECK(photometry.codeOfMass(0.1) < 70.0);
    CHECK(photometry.codeOfMass(500.0) == doctest::Approx(photometry.codeOfMass(59.0))); // clamped
    // Late types without a tabulated M_G: M_J + (G - J at L8V).
    const auto t5 = photometry.dwarf(85.0);
    const auto l8 = photometry.dwarf(78.0);
    CHECK(t5.g - t5.j == doctest::Approx(l8.g - l8.j));
    CHECK(std::isnan(t5.bp));
    // Early types without a tabulated M_G: M_G = M_V; colours held at the bluest tabulated row.
    CHECK(std::isfinite(photometry.dwarf(10.0).g));
    CHECK(photometry.dwarf(10.0).bp - photometry.dwarf(10.0).rp ==
          doctest::Approx(photometry.dwarf(19.0).bp - photometry.dwarf(19.0).rp));
}
