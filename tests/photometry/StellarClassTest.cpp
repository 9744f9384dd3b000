#include "photometry/StellarClass.h"

#include <doctest/doctest.h>

using namespace starcensus::photometry;

TEST_CASE("spectral codes follow the decimal MK subtype scale") {
    // Convention stated in StellarClass.h (common practice, no source).
    CHECK(parseSpectralType("G2V").value() == doctest::Approx(42.0));
    CHECK(parseSpectralType("M4.5 V").value() == doctest::Approx(64.5));
    CHECK(parseSpectralType("L1").value() == doctest::Approx(71.0));
    CHECK_FALSE(parseSpectralType("DA2").has_value());
    CHECK_FALSE(parseSpectralType("").has_value());
    CHECK(dwarfClassOfCode(64.5) == StellarClass::M);
    CHECK(dwarfClassOfCode(99.9) == StellarClass::Y);
    CHECK(spectralTypeLabel(42.0) == "G2.0V");
    CHECK(classFromName("WD") == StellarClass::WhiteDwarf);
    CHECK_FALSE(classFromName("Q").has_value());
}

TEST_CASE("census categories bin dwarfs by whole subtypes and never leave their class") {
    CHECK(categoryOf(StellarClass::G, 42.7) == 42);
    CHECK(classOfCategory(categoryOf(StellarClass::G, 42.7)) == StellarClass::G);
    CHECK(categoryOf(StellarClass::K, 61.0) == 59); // a code past its letter is clamped into it
    CHECK(classOfCategory(categoryOf(StellarClass::WhiteDwarf, 0.0)) == StellarClass::WhiteDwarf);
    CHECK(classOfCategory(categoryOf(StellarClass::Evolved, 0.0)) == StellarClass::Evolved);
    CHECK(classOfCategory(categoryOf(StellarClass::Unclassified, 0.0)) == StellarClass::Unclassified);
}

TEST_CASE("each unclassified reason is a category of the class unclassified") {
    for (const auto reason : {UnclassifiedReason::OutsideLoci, UnclassifiedReason::NoPhotometry,
                              UnclassifiedReason::LowParallaxSnr}) {
        const Category category = unclassifiedCategory(reason);
        CHECK(category < kCategoryCount);
        CHECK(classOfCategory(category) == StellarClass::Unclassified);
        CHECK(reasonOfCategory(category) == reason);
    }
    CHECK(categoryOf(StellarClass::Unclassified, 0.0) ==
          unclassifiedCategory(UnclassifiedReason::OutsideLoci));
    CHECK_FALSE(reasonOfCategory(categoryOf(StellarClass::M, 64.5)).has_value());
    CHECK_FALSE(reasonOfCategory(categoryOf(StellarClass::WhiteDwarf, 0.0)).has_value());
    CHECK(reasonName(UnclassifiedReason::NoPhotometry) == "no_photometry");
}
