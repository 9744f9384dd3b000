#include "photometry/DwarfLocus.h"
#include "photometry/base/InputError.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::photometry;

TEST_CASE("the shipped dwarf locus reproduces the Pecaut & Mamajek anchors") {
    const DwarfLocus& locus = DwarfLocus::shipped();
    // Rows of Mamajek's table v2024.05.15 (Pecaut & Mamajek 2013, Table 5), as quoted in
    // ../shared/reference/published-figures.md section 7: (M_G, BP-RP).
    struct Anchor {
        double code, abs_g_mag, bp_rp_mag;
    };
    for (const Anchor& anchor :
         {Anchor{19.5, 0.615, -0.087}, Anchor{20.0, 1.00, -0.037}, Anchor{30.0, 2.51, 0.377},
          Anchor{40.0, 4.325, 0.784}, Anchor{50.0, 5.553, 0.983}, Anchor{60.0, 8.10, 1.84},
          Anchor{69.5, 16.40, 4.86}}) {
        const LocusPoint point = locus.atCode(anchor.code);
        CHECK(point.abs_g_mag == doctest::Approx(anchor.abs_g_mag).epsilon(1e-9));
        CHECK(point.bp_rp_mag == doctest::Approx(anchor.bp_rp_mag).epsilon(1e-9));
    }
    // L0V: M_G 16.60 and no BP-RP (same section).
    CHECK(locus.atCode(70.0).abs_g_mag == doctest::Approx(16.60));
    CHECK(std::isnan(locus.atCode(70.0).bp_rp_mag));
    // G2V row of the same table: Teff 5770 K, 1.00 Msun, M_J 3.60, M_Ks 3.236.
    const LocusPoint sun_like = locus.atCode(42.0);
    CHECK(sun_like.teff_k == doctest::Approx(5770.0));
    CHECK(sun_like.mass_msun == doctest::Approx(1.00));
    CHECK(sun_like.abs_j_mag == doctest::Approx(3.60));
    CHECK(sun_like.abs_ks_mag == doctest::Approx(3.236));
    CHECK(sun_like.spectral_type == "G2.0V");
    // Same G2V row: B-V 0.650, J-H 0.293, Ks-W1 0.061; M4V: B-V 1.65, J-H 0.557, Ks-W1 0.180.
    CHECK(locus.valueAtCode(LocusQuantity::BVMag, 42.0) == doctest::Approx(0.650));
    CHECK(sun_like.j_h_mag == doctest::Approx(0.293));
    CHECK(sun_like.ks_w1_mag == doctest::Approx(0.061));
    CHECK(locus.valueAtCode(LocusQuantity::BVMag, 64.0) == doctest::Approx(1.65));
    CHECK(locus.valueAtCode(LocusQuantity::JHMag, 64.0) == doctest::Approx(0.557));
    CHECK(locus.valueAtCode(LocusQuantity::KsW1Mag, 64.0) == doctest::Approx(0.180));
    // The L6V-L8V M_G values the table marks uncertain (':') are kept: L7V 19.30.
    CHECK(locus.atCode(77.0).abs_g_mag == doctest::Approx(19.30));
}

TEST_CASE("dwarf locus interpolation is linear between rows and NaN outside") {
    const DwarfLocus& locus = DwarfLocus::shipped();
    // Halfway between G2V (M_G 4.635) and G3V (4.703), same table.
    CHECK(locus.atCode(42.5).abs_g_mag == doctest::Approx(0.5 * (4.635 + 4.703)));
    // M9.5V (BP-RP 4.86) to L0V (none) to ...: BP-RP ends at M9.5V.
    CHECK(std::isnan(locus.valueAtCode(LocusQuantity::BpRpMag, 70.5)));
    // M_G is missing for L9V, so L8.5V interpolates nothing beyond L8V (M_G 20.00).
    CHECK(std::isnan(locus.valueAtCode(LocusQuantity::AbsGMag, 78.5)));
    // J-Ks of T4V: M_J 14.55 - M_Ks 14.20.
    CHECK(locus.valueAtCode(LocusQuantity::JKsMag, 84.0) == doctest::Approx(0.35));
    CHECK(std::isnan(locus.atCode(std::nan("")).teff_k));
}

TEST_CASE("the locus inverts on monotone segments") {
    const DwarfLocus& locus = DwarfLocus::shipped();
    // G2V values of the table (Teff 5770 K, M_G 4.635, BP-RP 0.823, 1.00 Msun).
    CHECK(locus.codeFromTeff(5770.0) == doctest::Approx(42.0));
    CHECK(locus.codeFromAbsG(4.635) == doctest::Approx(42.0));
    CHECK(locus.codeFromBpRp(0.823) == doctest::Approx(42.0));
    CHECK(locus.codeFromMass(1.00) == doctest::Approx(42.0));
    // Round trip at non-tabulated codes.
    for (double code : {23.3, 45.7, 61.2, 64.5}) {
        CHECK(locus.codeFromBpRp(locus.valueAtCode(LocusQuantity::BpRpMag, code)) == doctest::Approx(code));
        CHECK(locus.codeFromTeff(locus.valueAtCode(LocusQuantity::TeffK, code)) == doctest::Approx(code));
    }
    // BP-RP turns over after M8.5V (5.10; M9V 4.78, M9.5V 4.86): the first branch is kept, so 4.86 is
    // M8V, and nothing is redder than 5.10.
    CHECK(locus.codeFromBpRp(4.86) == doctest::Approx(68.0));
    CHECK(locus.codeFromBpRp(5.10) == doctest::Approx(68.5));
    CHECK(std::isnan(locus.codeFromBpRp(5.2)));
    CHECK(locus.invertibleRange(LocusQuantity::BpRpMag)[1] == doctest::Approx(5.10));
    // M_G 15.20 at both M7.5V and M8V: the earlier type.
    CHECK(locus.codeFromAbsG(15.20) == doctest::Approx(67.5));
    // The dropped M8V tie means 15.55 lies halfway from M7.5V (15.20) to M8.5V (15.90).
    CHECK(locus.codeFromAbsG(15.55) == doctest::Approx(68.0));
}

TEST_CASE("a missing locus file is a one-line input error naming it") {
    CHECK_THROWS_AS(DwarfLocus::load("/nonexistent/locus.txt"), starcensus::InputError);
    CHECK_THROWS_WITH(DwarfLocus::load("/nonexistent/locus.txt"),
                      doctest::Contains("/nonexistent/locus.txt"));
}
