#include "photometry/BandMatch.h"
#include "photometry/Classifier.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <vector>

using namespace starcensus::photometry;

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

/// Horner evaluation, highest power first (numpy.polyval's order, as SPLAT lists the coefficients).
double polynomial(std::initializer_list<double> coefficients, double x) {
    double value = 0.0;
    for (const double c : coefficients) {
        value = value * x + c;
    }
    return value;
}
} // namespace

TEST_CASE("the W1 and W2 relations are Dupuy & Liu 2012's polynomials from M6 to T9") {
    // Dupuy & Liu 2012 (ApJS 201, 19) M_W1 and M_W2 against type, x = 6 (M6) ... 29 (T9), coefficients as
    // transcribed in SPLAT (aburgasser/splat, splat/empirical.py, commit 07af68e11c54). The shipped table
    // samples them at half subtypes; the matcher's 0.1-subtype grid interpolates linearly between.
    const BandMatcher& matcher = BandMatcher::shipped();
    for (double x = 6.0; x <= 29.0; x += 0.5) {
        const double code = 60.0 + x; // M0 = 60 in the project's codes, M0 = 0 in the paper's
        CAPTURE(x);
        CHECK(matcher.relationAbsMag(MatchBand::W1, code) ==
              doctest::Approx(polynomial({1.58040e-5, -3.33944e-4, -4.38105e-3, 3.55395e-1, 7.14765}, x))
                  .epsilon(0.0002)); // the table's 3 decimals
        CHECK(matcher.relationAbsMag(MatchBand::W2, code) ==
              doctest::Approx(polynomial({1.78555e-5, -8.81973e-4, 1.14325e-2, 1.92354e-1, 7.46564}, x))
                  .epsilon(0.0002));
    }
    // Where the locus relations hand over to them (M6V), the two agree: M_Ks - (Ks-W1) - (W1-W2) of the
    // Pecaut & Mamajek M6V row is 9.22 - 0.225 - 0.21 = 8.785, Dupuy & Liu's M_W2(M6) 8.864 (within their
    // 0.35 mag rms).
    CHECK(matcher.relationAbsMag(MatchBand::W2, 65.9) == doctest::Approx(8.785).epsilon(0.01));
    CHECK(std::abs(matcher.relationAbsMag(MatchBand::W2, 66.0) - 8.785) < 0.35);
    // The locus rows reproduce: G2V M_V 4.80, B-V 0.650 (Pecaut & Mamajek table).
    CHECK(matcher.relationAbsMag(MatchBand::V, 42.0) == doctest::Approx(4.80));
    CHECK(matcher.relationAbsMag(MatchBand::B, 42.0) == doctest::Approx(5.45));
}

TEST_CASE("the best match recovers injected codes and its interval covers them about 68% of the time") {
    // Injection and recovery: objects drawn at known codes from the matcher's own relations, with the
    // noise its chi^2 assumes (band errors, a colour scatter per band, one luminosity offset and one
    // distance-modulus error shared by all bands). The Delta chi^2 = 1 interval (Avni 1976, ApJ 210, 642)
    // should then cover the true code in about 68% of the draws where the relations are close to linear
    // over the interval; the grid (0.1 subtype) and the places where they bend (M_J turns over between L9
    // and T3 in the Pecaut & Mamajek table) narrow it, so 0.5-0.8 is asked (chosen here). Three band
    // sets: Johnson B V with 2MASS J Ks (F0-M5 dwarfs), 2MASS J H Ks with WISE W1 W2 (M7-T8), and MKO J
    // with W1 W2 (T6-Y2: J H Ks are not all tabulated so late).
    const BandMatcher& matcher = BandMatcher::shipped();
    const BandMatchSettings& settings = matcher.settings();
    std::mt19937_64 random(20261202);
    std::normal_distribution<double> normal;
    std::uniform_real_distribution<double> uniform;
    struct Case {
        std::vector<MatchBand> bands;
        double first_code, last_code;
    };
    const std::vector<Case> cases = {
        {{MatchBand::B, MatchBand::V, MatchBand::J, MatchBand::Ks}, 30.0, 65.0},
        {{MatchBand::J, MatchBand::H, MatchBand::Ks, MatchBand::W1, MatchBand::W2}, 67.0, 88.0},
        {{MatchBand::J, MatchBand::W1, MatchBand::W2}, 86.0, 92.0},
    };
    for (const Case& c : cases) {
        int trials = 0, covered = 0;
        std::vector<double> errors;
        for (int trial = 0; trial < 1500; ++trial) {
            const double code =
                std::round((c.first_code + (c.last_code - c.first_code) * uniform(random)) * 10.0) / 10.0;
            const double colour_scatter = code < 60.0   ? settings.colour_scatter_star_mag
                                          : code < 70.0 ? settings.colour_scatter_m_mag
                                                        : settings.colour_scatter_ultracool_mag;
            const double luminosity_scatter =
                code < 90.0 ? settings.luminosity_scatter_mag : settings.luminosity_scatter_y_mag;
            BandMatchInput input;
            input.modulus_error_mag = 0.1;
            const double common =
                luminosity_scatter * normal(random) + input.modulus_error_mag * normal(random);
            for (const MatchBand band : c.bands) {
                const double error = 0.05;
                input[band] = matcher.relationAbsMag(band, code) + common + colour_scatter * normal(random) +
                              error * normal(random);
                input.error_mag[static_cast<std::size_t>(band)] = error;
            }
            const BandMatchResult result = matcher.match(input);
            REQUIRE(std::isfinite(result.grid_code));
            ++trials;
            covered += result.code_low <= code && code <= result.code_high ? 1 : 0;
            errors.push_back(std::abs(result.grid_code - code));
        }
        std::sort(errors.begin(), errors.end());
        const double coverage = static_cast<double>(covered) / trials;
        const double median_error = errors[errors.size() / 2];
        MESSAGE("codes " << c.first_code << "-" << c.last_code << ", " << c.bands.size()
                         << " bands: interval coverage " << coverage << ", median |code error| "
                         << median_error);
        CHECK(coverage >= 0.5);
        CHECK(coverage <= 0.8);
        CHECK(median_error <= 1.0); // within a subtype (chosen here)
    }
}

TEST_CASE("Pecaut & Mamajek rows given only B, V, J and Ks return their own letter") {
    // Every row of the shipped Pecaut & Mamajek table (data/dwarf_locus_pecaut_mamajek.txt: Pecaut &
    // Mamajek 2013, ApJS 208, 9, Table 5, online version 2024.05.15) with M_V, B-V, M_J and M_Ks, as an
    // object at 10 pc (apparent = absolute) without Gaia photometry: the best match over B, V, J, Ks must
    // give the row's letter, and a code within one subtype (O and B stars within their letter: their
    // colours change little per subtype).
    const Classifier& classifier = Classifier::shipped();
    int rows = 0;
    for (const LocusPoint& row : classifier.locus().points()) {
        if (std::isnan(row.abs_v_mag + row.b_v_mag + row.abs_j_mag + row.abs_ks_mag)) {
            continue;
        }
        ++rows;
        PhotometricInput input;
        input.distance_modulus_mag = 0.0;
        input.b_mag = row.abs_v_mag + row.b_v_mag;
        input.v_mag = row.abs_v_mag;
        input.j_mag = row.abs_j_mag;
        input.ks_mag = row.abs_ks_mag;
        const Classification c = classifier.classify(input);
        INFO(row.spectral_type, " -> ", className(c.stellar_class), " ", c.spectral_code);
        CHECK(c.stellar_class == dwarfClassOfCode(row.spectral_code));
        CHECK(std::abs(c.spectral_code - row.spectral_code) <= (row.spectral_code < 20.0 ? 10.0 : 1.0));
        CHECK(hasFlag(c.flags, ClassificationFlag::BandMatch));
        CHECK(hasFlag(c.flags, ClassificationFlag::JohnsonColour));
        CHECK(c.code_low <= c.spectral_code + 0.5);
        CHECK(c.code_high >= c.spectral_code - 0.5);
    }
    CHECK(rows == 76); // O9V to M9V (M_J and M_Ks start at O9V, B-V ends at M9V)
    // B and V alone (no infrared) place the same rows too: colour and magnitude.
    PhotometricInput sun;
    sun.distance_modulus_mag = 0.0;
    sun.b_mag = 4.80 + 0.65; // G2V row
    sun.v_mag = 4.80;
    const Classification g2 = classifier.classify(sun);
    CHECK(g2.stellar_class == StellarClass::G);
    CHECK(g2.spectral_code == doctest::Approx(42.0).epsilon(0.02));
}

TEST_CASE("a band, or a survey's bands, that disagree with the rest are left out of the match") {
    const Classifier& classifier = Classifier::shipped();
    // An L5V dwarf of the table (M_J 13.46, J-H 1.02, M_Ks 11.87) at 10 pc with WISE W1 and W2 from the
    // Dupuy & Liu 2012 relations (11.166, 10.851).
    PhotometricInput input;
    input.distance_modulus_mag = 0.0;
    input.j_mag = 13.46;
    input.h_mag = 13.46 - 1.02;
    input.ks_mag = 11.87;
    input.w1_mag = 11.166;
    input.w2_mag = 10.851;
    const Classification clean = classifier.classify(input);
    CHECK(clean.stellar_class == StellarClass::L);
    CHECK(std::abs(clean.spectral_code - 75.0) <= 1.0);
    CHECK_FALSE(hasFlag(clean.flags, ClassificationFlag::BandLeftOut));
    // W1 quoted as a 5-mag-too-bright value (a blend): left out, same answer.
    input.w1_mag -= 5.0;
    const Classification blended = classifier.classify(input);
    CHECK(blended.stellar_class == StellarClass::L);
    CHECK(std::abs(blended.spectral_code - 75.0) <= 1.0);
    CHECK(hasFlag(blended.flags, ClassificationFlag::BandLeftOut));
    // J, H and Ks all from a brighter star 4 mag brighter and 1 mag bluer (a wrong 2MASS match): WISE
    // alone names it.
    input.w1_mag += 5.0;
    input.j_mag -= 5.0;
    input.h_mag -= 4.5;
    input.ks_mag -= 4.0;
    const Classification mismatched = classifier.classify(input);
    CHECK(mismatched.stellar_class == StellarClass::L);
    CHECK(hasFlag(mismatched.flags, ClassificationFlag::BandLeftOut));
    // Photometry no relation fits at all (every band 8 mag apart from the next) is unclassified.
    PhotometricInput nonsense;
    nonsense.distance_modulus_mag = 0.0;
    nonsense.j_mag = 10.0;
    nonsense.ks_mag = 2.0;
    nonsense.w2_mag = 18.0;
    const Classification outside = classifier.classify(nonsense);
    CHECK(outside.stellar_class == StellarClass::Unclassified);
    CHECK(hasFlag(outside.flags, ClassificationFlag::OutsideLocus));
}
