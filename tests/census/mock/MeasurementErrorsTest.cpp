#include "census/mock/MeasurementErrors.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::census;
using namespace starcensus::census::mock;

TEST_CASE("Gaia error laws pass through their anchors") {
    // Gaia EDR3 release summary / Lindegren et al. 2021 (A&A 649, A2), from memory: parallax error
    // 0.02-0.03 mas at G < 15, 0.07 at 17, 0.5 at 20, 1.3 at 21.
    CHECK(parallaxErrorMas(12.0) == doctest::Approx(0.025));
    CHECK(parallaxErrorMas(15.0) == doctest::Approx(0.025));
    CHECK(parallaxErrorMas(17.0) == doctest::Approx(0.07));
    CHECK(parallaxErrorMas(20.0) == doctest::Approx(0.5));
    CHECK(parallaxErrorMas(21.0) == doctest::Approx(1.3));
    // Log-linear between anchors: the geometric mean at the midpoint.
    CHECK(parallaxErrorMas(18.5) == doctest::Approx(std::sqrt(0.07 * 0.5)));
    CHECK(parallaxErrorMas(19.0) > parallaxErrorMas(18.0));
    // Proper motions: 1.4 mas/yr at G = 21 (same source, from memory).
    CHECK(properMotionErrorMasPerYr(21.0) == doctest::Approx(1.4));
    CHECK(properMotionErrorMasPerYr(10.0) == doctest::Approx(0.025));
    // Photometry (Riello et al. 2021 / EDR3 summary, from memory): G 1 mmag at 17, BP 108 mmag and
    // RP 52 mmag at 20, 0.3 / 0.9 / 0.6 mmag when bright.
    CHECK(gMagErrorMag(17.0) == doctest::Approx(0.001));
    CHECK(gMagErrorMag(20.0) == doctest::Approx(0.006));
    CHECK(bpMagErrorMag(20.0) == doctest::Approx(0.108));
    CHECK(rpMagErrorMag(20.0) == doctest::Approx(0.052));
    CHECK(gMagErrorMag(8.0) == doctest::Approx(0.0003));
    CHECK(bpMagErrorMag(8.0) == doctest::Approx(0.0009));
    CHECK(rpMagErrorMag(8.0) == doctest::Approx(0.0006));
}

TEST_CASE("2MASS-like errors reach S/N = 10 at the limit; BP/RP loss ramps 19 -> 21") {
    CHECK(twoMassErrorMag(14.3, 14.3) == doctest::Approx(std::hypot(0.02, 0.1)));
    CHECK(twoMassErrorMag(5.0, 14.3) == doctest::Approx(0.02).epsilon(1e-3)); // floor when bright
    CHECK(bpRpLossProbability(18.0, 19.0, 21.0) == 0.0);
    CHECK(bpRpLossProbability(20.0, 19.0, 21.0) == doctest::Approx(0.5));
    CHECK(bpRpLossProbability(22.0, 19.0, 21.0) == 1.0);
}
