#include "photometry/ModelPhotometry.h"

#include "photometry/DwarfLocus.h"

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

TEST_CASE("model photometry: Johnson B, V and WISE W1, W2 of dwarfs") {
    const ShippedModelPhotometry photometry;
    const DwarfLocus& locus = DwarfLocus::shipped();
    // G2V (code 42): the model's V, B-V, Ks-W1 and W1-W2 are the Pecaut & Mamajek table's columns.
    const auto g2 = photometry.dwarf(42.0);
    CHECK(g2.v == doctest::Approx(locus.valueAtCode(LocusQuantity::AbsVMag, 42.0)));
    CHECK(g2.b - g2.v == doctest::Approx(locus.valueAtCode(LocusQuantity::BVMag, 42.0)));
    CHECK(g2.ks - g2.w1 == doctest::Approx(locus.valueAtCode(LocusQuantity::KsW1Mag, 42.0)));
    CHECK(g2.w1 - g2.w2 == doctest::Approx(locus.valueAtCode(LocusQuantity::W1W2Mag, 42.0)));
    // The Sun's M_V is 4.81-4.83 (Willmer 2018, ApJS 236, 47; from memory): G2V within 0.1 mag (the
    // table: 4.80).
    CHECK(g2.v == doctest::Approx(4.82).epsilon(0.02));
    // T and Y dwarfs: W1 - W2 as tabulated, M_W2 from the subtype medians of the Best et al. 2021 and
    // Kirkpatrick et al. 2019 compilations (ModelPhotometry.h): T8 13.53, Y0 14.62; M_W2 grows later.
    for (const double code : {85.0, 88.0, 90.0, 91.0}) {
        const auto late = photometry.dwarf(code);
        CHECK(late.w1 - late.w2 == doctest::Approx(locus.valueAtCode(LocusQuantity::W1W2Mag, code)));
        CHECK(std::isnan(late.v));
    }
    CHECK(photometry.dwarf(88.0).w2 == doctest::Approx(13.53));
    CHECK(photometry.dwarf(90.0).w2 == doctest::Approx(14.62));
    // From T3V on (the table's T2V, 11.93, lies 0.15 mag below the T3 median).
    double previous = photometry.dwarf(83.0).w2;
    for (double code = 83.5; code <= 94.0; code += 0.5) {
        CHECK(photometry.dwarf(code).w2 >= previous - 0.01); // T5-T6 are level (12.82, 12.83)
        previous = photometry.dwarf(code).w2;
    }
    // Joined to the table's own M_W2 at T2V (M_Ks - (Ks-W1) - (W1-W2) = 13.45 - 0.53 - 0.99 = 11.93).
    CHECK(photometry.dwarf(82.0).w2 == doctest::Approx(11.93));
    // White dwarfs: the shipped cooling tables have no Johnson or WISE bands.
    const auto wd = photometry.whiteDwarf(1e9, 8.0, WhiteDwarfAtmosphere::Hydrogen);
    CHECK(std::isnan(wd.v));
    CHECK(std::isnan(wd.w2));
}
