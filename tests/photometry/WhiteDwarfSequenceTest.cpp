#include "photometry/WhiteDwarfSequence.h"
#include "photometry/DwarfLocus.h"
#include "photometry/base/InputError.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::photometry;

TEST_CASE("the shipped DA table gives the Montreal log g 8.0 photometry") {
    const auto& white_dwarfs = WhiteDwarfSequence::shipped();
    // Montreal DA table (Montreal_WD_Table_DA_13012021.txt), log g 8.0 rows, absolute EDR3 G3, BP3, RP3,
    // as quoted in ../shared/reference/published-figures.md section 7.
    struct Row {
        double teff_k, g, bp, rp;
    };
    for (const Row& row : {Row{20000, 10.787, 10.692, 10.973}, Row{10000, 12.173, 12.215, 12.081},
                           Row{5000, 14.853, 15.316, 14.225}, Row{4000, 15.809, 16.494, 15.014}}) {
        const auto p = white_dwarfs.atTeff(row.teff_k, 8.0, WhiteDwarfAtmosphere::Hydrogen);
        CHECK(p.abs_g_mag == doctest::Approx(row.g).epsilon(1e-9));
        CHECK(p.abs_bp_mag == doctest::Approx(row.bp).epsilon(1e-9));
        CHECK(p.abs_rp_mag == doctest::Approx(row.rp).epsilon(1e-9));
        CHECK(p.bp_rp_mag == doctest::Approx(row.bp - row.rp).epsilon(1e-9));
    }
    // Same table, 10000 K log g 8.0 row: 0.600 Msun, cooling age 6.330e8 yr.
    const auto p = white_dwarfs.atTeff(10000, 8.0, WhiteDwarfAtmosphere::Hydrogen);
    CHECK(p.mass_msun == doctest::Approx(0.600));
    CHECK(p.cooling_age_yr == doctest::Approx(6.330e8));
    CHECK(white_dwarfs.models(WhiteDwarfAtmosphere::Hydrogen).size() == 5 * 61);
    CHECK(white_dwarfs.models(WhiteDwarfAtmosphere::Helium).size() == 5 * 72);
}

TEST_CASE("white-dwarf interpolation lies between neighbouring models and is NaN off the grid") {
    const auto& white_dwarfs = WhiteDwarfSequence::shipped();
    // Montreal DA table: log g 7.5 and 8.0 at 10000 K bracket log g 7.75; log g 8.0 rows at 9500 and
    // 10000 K bracket 9750 K. The interpolant must lie between the two models in each case.
    const auto at = [&](double teff, double log_g) {
        return white_dwarfs.atTeff(teff, log_g, WhiteDwarfAtmosphere::Hydrogen);
    };
    const auto mid_g = at(10000, 7.75), low = at(10000, 7.5), high = at(10000, 8.0);
    CHECK(mid_g.abs_g_mag == doctest::Approx(0.5 * (low.abs_g_mag + high.abs_g_mag)));
    CHECK(mid_g.mass_msun == doctest::Approx(0.5 * (low.mass_msun + high.mass_msun)));
    const auto mid_t = at(9750, 8.0), cool = at(9500, 8.0);
    CHECK(mid_t.abs_g_mag < cool.abs_g_mag);
    CHECK(mid_t.abs_g_mag > high.abs_g_mag);
    CHECK(mid_t.cooling_age_yr < cool.cooling_age_yr);
    CHECK(mid_t.cooling_age_yr > high.cooling_age_yr);
    CHECK(std::isnan(at(10000, 6.9).abs_g_mag));
    CHECK(std::isnan(at(1000, 8.0).abs_g_mag)); // the DA grid starts at 1500 K
    CHECK(std::isnan(white_dwarfs.atTeff(3000, 8.0, WhiteDwarfAtmosphere::Helium).abs_g_mag)); // DB: 3250 K
}

TEST_CASE("cooling age and Teff invert each other") {
    const auto& white_dwarfs = WhiteDwarfSequence::shipped();
    for (auto atmosphere : {WhiteDwarfAtmosphere::Hydrogen, WhiteDwarfAtmosphere::Helium}) {
        for (double log_g : {7.0, 8.0, 8.5}) { // grid log g: exact inverse
            for (double teff : {4200.0, 6100.0, 9000.0, 14000.0, 25000.0}) {
                const double age = white_dwarfs.atTeff(teff, log_g, atmosphere).cooling_age_yr;
                CHECK(white_dwarfs.teffAtCoolingAge(age, log_g, atmosphere) ==
                      doctest::Approx(teff).epsilon(1e-9));
            }
        }
        // Between grid log g the inverse interpolates Teff at fixed age, not age at fixed Teff, so the
        // round trip is close but not exact: within 2% in Teff (tolerance chosen here).
        for (double teff : {5000.0, 8000.0, 12000.0}) {
            const double age = white_dwarfs.atTeff(teff, 8.25, atmosphere).cooling_age_yr;
            CHECK(white_dwarfs.teffAtCoolingAge(age, 8.25, atmosphere) ==
                  doctest::Approx(teff).epsilon(0.02));
        }
    }
    // Montreal DA log g 8.0: cooling age 6.330e8 yr at 10000 K, so 1 Gyr is cooler, 100 Myr hotter.
    const auto& da = WhiteDwarfAtmosphere::Hydrogen;
    CHECK(white_dwarfs.teffAtCoolingAge(6.330e8, 8.0, da) == doctest::Approx(10000.0));
    CHECK(white_dwarfs.teffAtCoolingAge(1e9, 8.0, da) < 10000.0);
    CHECK(white_dwarfs.teffAtCoolingAge(1e8, 8.0, da) > 10000.0);
    const auto photometry = white_dwarfs.atCoolingAge(6.330e8, 8.0, da);
    CHECK(photometry.abs_g_mag == doctest::Approx(12.173));
    // Ages beyond the grid: the DA log g 8.0 models end at 1.55e10 yr (1500 K); negative is invalid.
    CHECK(std::isnan(white_dwarfs.teffAtCoolingAge(2e10, 8.0, da)));
    CHECK(std::isnan(white_dwarfs.teffAtCoolingAge(-1.0, 8.0, da)));
    // Age 0: the DA log g 8.0 models from 120000 K up have cooling age 0 in the table; the coolest of
    // them is returned.
    CHECK(white_dwarfs.teffAtCoolingAge(0.0, 8.0, da) == doctest::Approx(120000.0));
}

TEST_CASE("the white-dwarf boundary lies between the locus and the cooling sequences") {
    const auto& locus = DwarfLocus::shipped();
    const auto& white_dwarfs = WhiteDwarfSequence::shipped();
    const WhiteDwarfBoundary boundary(locus, white_dwarfs);
    // Colours of Pecaut & Mamajek F0V (0.377), K0V (0.983), M0V (1.84) and M4V (2.94) rows.
    for (double code : {30.0, 50.0, 60.0, 64.0}) {
        const auto point = locus.atCode(code);
        const double boundary_g = boundary.absGMag(point.bp_rp_mag);
        CHECK(boundary_g > point.abs_g_mag + 2.5); // at least 2.5 mag below the locus (chosen here)
        // and brighter than every DA/DB log g >= 7.5 model of that colour (Montreal tables).
        for (auto atmosphere : {WhiteDwarfAtmosphere::Hydrogen, WhiteDwarfAtmosphere::Helium}) {
            for (const auto& model : white_dwarfs.models(atmosphere)) {
                const double bp_rp = model.abs_bp_mag - model.abs_rp_mag;
                if (model.log_g >= 7.5 && std::abs(bp_rp - point.bp_rp_mag) < 0.05) {
                    CHECK(model.abs_g_mag > boundary_g);
                }
            }
        }
    }
    // At BP-RP 0.43 the DA log g 7.0 7500 K model has M_G 11.85 and the locus (F2V-F3V) about 2.93,
    // so midway is about 7.4 (Montreal DA table; Pecaut & Mamajek table).
    CHECK(boundary.absGMag(0.426) == doctest::Approx(7.4).epsilon(0.02));
}

TEST_CASE("a missing white-dwarf table is a one-line input error naming it") {
    const std::string db = STARCENSUS_SOURCE_DIR "/data/white_dwarf_montreal_db.txt";
    CHECK_THROWS_WITH(WhiteDwarfSequence::load("/nonexistent/da.txt", db),
                      doctest::Contains("/nonexistent/da.txt"));
}

TEST_CASE("white-dwarf Teff and mass come back from a model's colour and absolute magnitude") {
    // Montreal DA models at log g 8.0 (published-figures.md section 7 and data/white_dwarf_montreal_da.txt):
    // Teff 20000 K: G 10.787, BP 10.692, RP 10.973, 0.624 Msun; 10000 K: 12.173, 12.215, 12.081, 0.600 Msun;
    // 5000 K: 14.853, 15.316, 14.225, 0.580 Msun. Tolerances: 1% in Teff, 0.01 Msun (the grid's own nodes).
    const WhiteDwarfSequence& sequence = WhiteDwarfSequence::shipped();
    struct Model {
        double teff_k, g, bp, rp, mass_msun;
    };
    for (const Model& model :
         {Model{20000, 10.787, 10.692, 10.973, 0.624}, Model{10000, 12.173, 12.215, 12.081, 0.600},
          Model{5000, 14.853, 15.316, 14.225, 0.580}}) {
        const WhiteDwarfParameters fit =
            sequence.fromColourMagnitude(model.bp - model.rp, model.g, WhiteDwarfAtmosphere::Hydrogen);
        CAPTURE(model.teff_k);
        CHECK(fit.inside_grid);
        CHECK(fit.teff_k == doctest::Approx(model.teff_k).epsilon(0.01));
        CHECK(fit.log_g == doctest::Approx(8.0).epsilon(0.005));
        CHECK(std::abs(fit.mass_msun - model.mass_msun) < 0.01);
    }
    // Between grid tracks: a model at (Teff, log g 8.25) interpolated by atTeff comes back.
    const WhiteDwarfPhotometry between = sequence.atTeff(8000.0, 8.25, WhiteDwarfAtmosphere::Hydrogen);
    const WhiteDwarfParameters fit =
        sequence.fromColourMagnitude(between.bp_rp_mag, between.abs_g_mag, WhiteDwarfAtmosphere::Hydrogen);
    CHECK(fit.teff_k == doctest::Approx(8000.0).epsilon(0.02));
    CHECK(fit.log_g == doctest::Approx(8.25).epsilon(0.01));
    // Far redder than any model: no Teff.
    CHECK(std::isnan(sequence.fromColourMagnitude(4.0, 15.0, WhiteDwarfAtmosphere::Hydrogen).teff_k));
}
