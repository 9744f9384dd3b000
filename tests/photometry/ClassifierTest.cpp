#include "photometry/Classifier.h"
#include "photometry/ClassGrid.h"
#include "photometry/SpectralType.h"
#include "tests/support/ReferenceTable.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <vector>

using namespace starcensus::photometry;

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

using starcensus::testing::splitCsv;

double toNumber(const std::string& text) {
    return text.empty() ? kNaN : std::stod(text);
}

/// The rows of a reference table under tests/reference/ (split at commas), after checking its header line;
/// every row must have as many fields as the header.
std::vector<std::vector<std::string>> referenceRows(const std::string& file_name, const std::string& header) {
    std::ifstream file(STARCENSUS_SOURCE_DIR "/tests/reference/" + file_name);
    REQUIRE_MESSAGE(file, file_name);
    std::string line;
    std::getline(file, line);
    REQUIRE(line == header);
    const std::size_t columns = splitCsv(header).size();
    std::vector<std::vector<std::string>> rows;
    while (std::getline(file, line)) {
        rows.push_back(splitCsv(line));
        REQUIRE(rows.back().size() == columns);
    }
    return rows;
}

/// A number of a reference table; the tables' missing markers ("-", "NaN", "null", empty) give NaN.
double referenceNumber(const std::string& text) {
    return text == "-" || text == "NaN" || text == "null" ? kNaN : toNumber(text);
}
} // namespace

TEST_CASE("absolute magnitude and its error from the parallax") {
    // Distance modulus definition: M = m + 5 log10(parallax/mas) - 10; at 100 mas (10 pc) M = m.
    const AbsoluteMagnitude at_10pc = absoluteMagnitude(10.0, 100.0, 1.0);
    CHECK(at_10pc.mag == doctest::Approx(10.0));
    CHECK(at_10pc.error_mag == doctest::Approx(5.0 / std::log(10.0) * 0.01)); // 0.0217 mag
    CHECK(absoluteMagnitude(10.0, 10.0, 0.1).mag == doctest::Approx(5.0));    // 100 pc
    CHECK(std::isnan(absoluteMagnitude(10.0, -1.0, 0.1).mag));
    CHECK(std::isnan(absoluteMagnitude(10.0, kNaN, 0.1).mag));

    PhotometricInput input;
    // The Sun (M_G 4.67, BP-RP 0.82, from memory as below) at 20 pc: distance modulus 5 log10(2) mag.
    const double modulus = 5.0 * std::log10(2.0);
    input.g_mag = 4.67 + modulus;
    input.bp_mag = 5.0 + modulus;
    input.rp_mag = 4.18 + modulus;
    input.parallax_mas = 50.0;
    input.parallax_error_mas = 20.0; // S/N 2.5
    const Classification c = Classifier::shipped().classify(input);
    CHECK(c.abs_g_mag == doctest::Approx(4.67));
    CHECK(c.abs_g_error_mag == doctest::Approx(5.0 / std::log(10.0) * 0.4));
    CHECK(hasFlag(c.flags, ClassificationFlag::LowParallaxSnr));
    input.parallax_mas = -3.0;
    const Classification bad = Classifier::shipped().classify(input);
    CHECK(bad.stellar_class == StellarClass::Unclassified);
    CHECK(hasFlag(bad.flags, ClassificationFlag::NoAbsoluteMagnitude));
}

TEST_CASE("the Sun classifies as G2V") {
    // Solar M_G = 4.67 and BP-RP = 0.82, from memory (Casagrande & VandenBerg 2018, MNRAS 479, L102).
    const Classification sun = Classifier::shipped().classifyAbsolute(4.67, 0.82);
    CHECK(sun.stellar_class == StellarClass::G);
    CHECK(std::abs(sun.spectral_code - 42.0) <= 1.0); // tolerance: one subtype
    CHECK(sun.flags == 0);
    CHECK(std::abs(sun.locus_offset_mag) < 0.2);
    CHECK(sun.teff_k == doctest::Approx(5772.0).epsilon(0.02)); // IAU 2015 nominal solar Teff, 5772 K
    CHECK(sun.mass_msun == doctest::Approx(1.0).epsilon(0.05));
}

TEST_CASE("every dwarf-locus row with M_G and BP-RP classifies as its own type") {
    // Rows of Pecaut & Mamajek (2013, Table 5; Mamajek table v2024.05.15). Tolerance: 1 subtype in code
    // and the same class letter.
    const Classifier& classifier = Classifier::shipped();
    int rows = 0;
    for (const LocusPoint& row : classifier.locus().points()) {
        if (std::isnan(row.abs_g_mag) || std::isnan(row.bp_rp_mag)) {
            continue;
        }
        ++rows;
        const Classification c = classifier.classifyAbsolute(row.abs_g_mag, row.bp_rp_mag, row.g_rp_mag);
        INFO(row.spectral_type, " -> ", className(c.stellar_class), " ", c.spectral_code);
        CHECK(c.stellar_class == dwarfClassOfCode(row.spectral_code));
        CHECK(std::abs(c.spectral_code - row.spectral_code) <= 1.0);
    }
    CHECK(rows == 63); // B9V to M9.5V
}

TEST_CASE("Montreal DA and DB models classify as white dwarfs") {
    // Montreal DA/DB synthetic EDR3 photometry (Bergeron group tables), log g 7.5-9.0, 4000-40000 K
    // (BP-RP from about -0.5 to 1.6, where Gaia measures white dwarfs).
    const Classifier& classifier = Classifier::shipped();
    const auto& white_dwarfs = WhiteDwarfSequence::shipped();
    int models = 0;
    for (auto atmosphere : {WhiteDwarfAtmosphere::Hydrogen, WhiteDwarfAtmosphere::Helium}) {
        for (const WhiteDwarfModel& model : white_dwarfs.models(atmosphere)) {
            if (model.log_g < 7.5 || model.teff_k < 4000.0 || model.teff_k > 40000.0) {
                continue;
            }
            ++models;
            const Classification c =
                classifier.classifyAbsolute(model.abs_g_mag, model.abs_bp_mag - model.abs_rp_mag);
            INFO("Teff ", model.teff_k, " log g ", model.log_g);
            CHECK(c.stellar_class == StellarClass::WhiteDwarf);
        }
    }
    CHECK(models > 200);
    // Sirius B, M_G 11.39, BP-RP -0.28, and EGGR 453, M_G 15.76, BP-RP 1.42 (10 pc sample values quoted
    // in ../shared/reference/published-figures.md section 3).
    CHECK(classifier.classifyAbsolute(11.39, -0.28).stellar_class == StellarClass::WhiteDwarf);
    CHECK(classifier.classifyAbsolute(15.76, 1.42).stellar_class == StellarClass::WhiteDwarf);
}

TEST_CASE("without Gaia colours, Johnson V and 2MASS Ks classify dwarfs, giants and white dwarfs") {
    const Classifier& classifier = Classifier::shipped();
    const auto fromJohnson = [&](double abs_v, double v_ks) {
        return classifier.classifyAbsolute(NAN, NAN, NAN, NAN, NAN, NAN, abs_v, v_ks);
    };
    // Every row of the Pecaut & Mamajek table (data/) with M_V and M_Ks, from M_V and V-Ks alone: A0V and
    // later its own type within one subtype, B stars (whose V-Ks barely changes) their letter.
    int rows = 0;
    for (const LocusPoint& row : classifier.locus().points()) {
        if (std::isnan(row.abs_v_mag) || std::isnan(row.abs_ks_mag) || row.spectral_code < 10.0) {
            continue; // O stars: V-Ks nearly constant
        }
        ++rows;
        const Classification c = fromJohnson(row.abs_v_mag, row.abs_v_mag - row.abs_ks_mag);
        INFO(row.spectral_type, " -> ", className(c.stellar_class), " ", c.spectral_code);
        CHECK(c.stellar_class == dwarfClassOfCode(row.spectral_code));
        CHECK(std::abs(c.spectral_code - row.spectral_code) <= (row.spectral_code < 20.0 ? 10.0 : 1.0));
        CHECK(hasFlag(c.flags, ClassificationFlag::JohnsonColour));
    }
    CHECK(rows == 80); // B0V to L4V
    // Montreal DA models, log g 8.0, V and 2MASS Ks (Bergeron group, Montreal_WD_Table_DA_13012021.txt):
    // 20000 K, 10000 K, 6500 K and 4250 K.
    for (const auto& [abs_v, abs_ks] : {std::pair{10.763, 11.433}, std::pair{12.170, 12.117},
                                        std::pair{13.826, 12.675}, std::pair{15.984, 14.042}}) {
        CAPTURE(abs_v);
        CHECK(fromJohnson(abs_v, abs_v - abs_ks).stellar_class == StellarClass::WhiteDwarf);
    }
    // Red-clump giants: M_V about +0.9, V-Ks about 2.4 (from memory), ~6 mag above K dwarfs of that colour.
    CHECK(fromJohnson(0.9, 2.4).stellar_class == StellarClass::Evolved);
    // Altair, too bright for Gaia's colours: V 0.76, Ks 0.24, parallax 194.95 mas, A7V (all from memory;
    // the Ks of so bright a star is uncertain by ~0.1 mag, about a subtype).
    PhotometricInput altair;
    altair.v_mag = 0.76;
    altair.ks_mag = 0.24;
    altair.parallax_mas = 194.95;
    altair.parallax_error_mas = 0.57;
    const Classification c = classifier.classify(altair);
    CHECK(c.stellar_class == StellarClass::A);
    CHECK(std::abs(c.spectral_code - 27.0) <= 3.0);
    CHECK(hasClassifiableBands(altair));
    altair.ks_mag = NAN; // V alone has no colour: nothing to place
    CHECK_FALSE(hasClassifiableBands(altair));
    CHECK(hasFlag(classifier.classify(altair).flags, ClassificationFlag::NoUsableBand));
}

TEST_CASE("red-clump giants classify as evolved") {
    // Ruiz-Dern et al. 2018 (A&A 609, A116): M_G = 0.495 + 1.121 (G-Ks - 2.1), for G-Ks 2.1-2.5; the
    // BP-RP range 1.1-1.3 of clump giants is from memory.
    const Classifier& classifier = Classifier::shipped();
    for (double g_ks = 2.1; g_ks <= 2.5001; g_ks += 0.1) {
        for (double bp_rp = 1.1; bp_rp <= 1.3001; bp_rp += 0.05) {
            const Classification c = classifier.classifyAbsolute(0.495 + 1.121 * (g_ks - 2.1), bp_rp);
            CHECK(c.stellar_class == StellarClass::Evolved);
            CHECK(c.locus_offset_mag < -4.0); // ~5 mag above K dwarfs of that colour
        }
    }
}

TEST_CASE("the binary band, the evolved threshold and missing colours set flags") {
    // Offsets from the K0V row of Pecaut & Mamajek (M_G 5.553, BP-RP 0.983); thresholds are the
    // documented defaults of ClassifierSettings.
    const Classifier& classifier = Classifier::shipped();
    const Classification binary = classifier.classifyAbsolute(5.553 - 0.7, 0.983);
    CHECK(binary.stellar_class == StellarClass::K);
    CHECK(binary.flags == 0);
    CHECK(binary.locus_offset_mag == doctest::Approx(-0.7));
    const Classification between = classifier.classifyAbsolute(5.553 - 0.9, 0.983);
    CHECK(between.stellar_class == StellarClass::K);
    CHECK(hasFlag(between.flags, ClassificationFlag::AboveBinaryBand));
    CHECK(classifier.classifyAbsolute(5.553 - 1.1, 0.983).stellar_class == StellarClass::Evolved);
    const Classification below = classifier.classifyAbsolute(5.553 + 1.5, 0.983);
    CHECK(below.stellar_class == StellarClass::K);
    CHECK(hasFlag(below.flags, ClassificationFlag::BelowLocus));
    // Redder than BP-RP 1.8 the evolved threshold is 2 mag: 1.5 mag above the M4V row (M_G 11.21,
    // BP-RP 2.94) is a flagged M dwarf, 3 mag above is evolved.
    const Classification bright_m = classifier.classifyAbsolute(11.21 - 1.5, 2.94);
    CHECK(bright_m.stellar_class == StellarClass::M);
    CHECK(hasFlag(bright_m.flags, ClassificationFlag::AboveBinaryBand));
    CHECK(classifier.classifyAbsolute(11.21 - 3.0, 2.94).stellar_class == StellarClass::Evolved);
    // M_G alone: M4V row (M_G 11.21) gives M4 with the lower-confidence flag.
    const Classification no_colour = classifier.classifyAbsolute(11.21, kNaN);
    CHECK(no_colour.stellar_class == StellarClass::M);
    CHECK(no_colour.spectral_code == doctest::Approx(64.0));
    CHECK(hasFlag(no_colour.flags, ClassificationFlag::NoColour));
    // ...but a G-RP far bluer than an M4V's (1.24) is not a dwarf.
    const Classification blue = classifier.classifyAbsolute(11.21, kNaN, 0.2);
    CHECK(blue.stellar_class == StellarClass::Unclassified);
    CHECK(hasFlag(blue.flags, ClassificationFlag::OutsideLocus));
    const Classification nothing = classifier.classifyAbsolute(kNaN, kNaN);
    CHECK(nothing.stellar_class == StellarClass::Unclassified);
    CHECK(hasFlag(nothing.flags, ClassificationFlag::NoAbsoluteMagnitude));
}

TEST_CASE("L and T rows of the dwarf table classify as L and T") {
    // Rows L0V-T9.5V of Pecaut & Mamajek / Mamajek table v2024.05.15. Near infrared: M_J and J-Ks;
    // optical: M_G and G-RP (L0V-L8V). Tolerance: the class letter; code within 1.5 subtypes (chosen
    // here: the J-Ks, M_J locus folds over in the early T dwarfs).
    const Classifier& classifier = Classifier::shipped();
    for (const LocusPoint& row : classifier.locus().points()) {
        if (row.spectral_code < 70.0 || row.spectral_code >= 90.0) {
            continue;
        }
        const StellarClass expected = dwarfClassOfCode(row.spectral_code);
        INFO(row.spectral_type);
        if (!std::isnan(row.abs_ks_mag)) {
            const Classification nir =
                classifier.classifyAbsolute(kNaN, kNaN, kNaN, row.abs_j_mag, row.abs_j_mag - row.abs_ks_mag);
            CHECK(nir.stellar_class == expected);
            CHECK(std::abs(nir.spectral_code - row.spectral_code) <= 1.5);
            CHECK(hasFlag(nir.flags, ClassificationFlag::NearInfrared));
        }
        if (!std::isnan(row.abs_g_mag)) {
            const Classification optical = classifier.classifyAbsolute(row.abs_g_mag, kNaN, row.g_rp_mag);
            CHECK(optical.stellar_class == expected);
            CHECK(std::abs(optical.spectral_code - row.spectral_code) <= 1.0);
        }
    }
}

TEST_CASE("CARMENES M dwarfs classify as M") {
    // Cifuentes et al. (arXiv:2412.12264) CARMENES input catalogue IX, cif03.full_table.csv: literature
    // spectral types SpT, Gaia DR3 parallax and G/BP/RP, 2MASS J/Ks (columns copied to tests/reference/).
    std::ifstream file(STARCENSUS_SOURCE_DIR "/tests/reference/carmenes_ix_photometry.csv");
    REQUIRE(file);
    std::string line;
    std::getline(file, line);
    const auto header = splitCsv(line);
    const auto column = [&](const std::string& name) {
        const auto it = std::find(header.begin(), header.end(), name);
        REQUIRE(it != header.end());
        return static_cast<std::size_t>(it - header.begin());
    };
    const std::size_t spt = column("SpT"), plx = column("parallax"), plx_error = column("parallax_error"),
                      g = column("G_mag"), bp = column("BP_mag"), rp = column("RP_mag"), j = column("J_mag"),
                      ks = column("Ks_mag");
    const Classifier& classifier = Classifier::shipped();
    std::map<std::string, std::map<std::string, int>> confusion; // true letter -> assigned class -> count
    std::vector<double> subtype_errors;
    int m_dwarfs = 0, m_assigned = 0;
    while (std::getline(file, line)) {
        const auto fields = splitCsv(line);
        if (fields.size() != header.size()) {
            continue;
        }
        PhotometricInput input;
        input.parallax_mas = toNumber(fields[plx]);
        input.parallax_error_mas = toNumber(fields[plx_error]);
        input.g_mag = toNumber(fields[g]);
        input.bp_mag = toNumber(fields[bp]);
        input.rp_mag = toNumber(fields[rp]);
        input.j_mag = toNumber(fields[j]);
        input.ks_mag = toNumber(fields[ks]);
        const std::string& type = fields[spt];
        if (type.empty() || !(input.parallax_mas > 10.0 * input.parallax_error_mas) ||
            std::isnan(input.bp_mag) || std::isnan(input.rp_mag) || std::isnan(input.g_mag)) {
            continue;
        }
        const Classification c = classifier.classify(input);
        confusion[type.substr(0, 1)][std::string(className(c.stellar_class))]++;
        // M dwarfs: "M<subtype>" followed by nothing or luminosity class V.
        const auto code = parseSpectralType(type);
        std::size_t end = 1;
        while (end < type.size() &&
               (std::isdigit(static_cast<unsigned char>(type[end])) || type[end] == '.')) {
            ++end;
        }
        std::string luminosity = type.substr(end);
        luminosity.erase(std::remove(luminosity.begin(), luminosity.end(), ' '), luminosity.end());
        if (type[0] != 'M' || !code || !(luminosity.empty() || luminosity == "V")) {
            continue;
        }
        ++m_dwarfs;
        if (c.stellar_class == StellarClass::M) {
            ++m_assigned;
        }
        if (!std::isnan(c.spectral_code)) {
            subtype_errors.push_back(std::abs(c.spectral_code - *code));
        }
    }
    std::ostringstream table;
    table << "CARMENES (parallax S/N > 10, BP/RP present): true letter -> assigned class counts\n";
    for (const auto& [truth, assigned] : confusion) {
        table << "  " << truth << ":";
        for (const auto& [name, count] : assigned) {
            table << " " << name << "=" << count;
        }
        table << "\n";
    }
    std::sort(subtype_errors.begin(), subtype_errors.end());
    const double median = subtype_errors.empty() ? kNaN : subtype_errors[subtype_errors.size() / 2];
    const double fraction = static_cast<double>(m_assigned) / std::max(m_dwarfs, 1);
    table << "M dwarfs (V or no luminosity class): " << m_dwarfs << ", assigned M: " << m_assigned << " ("
          << 100.0 * fraction << "%), median |subtype error| " << median << "\n";
    MESSAGE(table.str());
    CHECK(m_dwarfs > 1000);
    CHECK(fraction >= 0.90); // requirement of the census design (90% of M dwarfs recovered as M)
    CHECK(median <= 1.0);    // and a median subtype error of at most one subtype
}

TEST_CASE("the lookup grid agrees with the exact classifier away from boundaries") {
    const Classifier& classifier = Classifier::shipped();
    const ClassGrid grid = ClassGrid::fromClassifier(classifier);
    std::mt19937_64 generator(20240515);
    std::uniform_real_distribution<double> colour(-0.9, 5.9), magnitude(-5.0, 23.0);
    const double step = grid.cellMag();
    int compared = 0;
    for (int i = 0; i < 20000; ++i) {
        const double bp_rp = colour(generator), abs_g = magnitude(generator);
        const Category cell = grid.lookup(static_cast<float>(bp_rp), static_cast<float>(abs_g));
        // Skip points within one cell of a class boundary: any neighbouring cell of another class.
        bool near_boundary = false;
        int neighbour_spread = 0; // largest category difference to a neighbouring cell
        for (int a = -1; a <= 1; ++a) {
            for (int b = -1; b <= 1; ++b) {
                const Category neighbour =
                    grid.lookup(static_cast<float>(bp_rp + a * step), static_cast<float>(abs_g + b * step));
                near_boundary |= classOfCategory(neighbour) != classOfCategory(cell);
                neighbour_spread = std::max(neighbour_spread, std::abs(int{neighbour} - int{cell}));
            }
        }
        if (near_boundary) {
            continue;
        }
        ++compared;
        const Classification exact = classifier.classifyAbsolute(abs_g, bp_rp);
        CHECK(classOfCategory(cell) == exact.stellar_class);
        // Whole-subtype categories: the exact point may fall one subtype beyond the cell centre's, plus
        // however fast the code changes across neighbouring cells.
        CHECK(std::abs(static_cast<int>(cell) -
                       static_cast<int>(categoryOf(exact.stellar_class, exact.spectral_code))) <=
              neighbour_spread + 1);
    }
    CHECK(compared > 15000);
    // The M_G-only grid: M4V row (M_G 11.21) of Pecaut & Mamajek.
    CHECK(grid.lookupMagnitudeOnly(11.21f) == 64);
    CHECK(classOfCategory(grid.lookup(0.5f, 99.0f)) == StellarClass::Unclassified);
    CHECK(classOfCategory(grid.lookup(0.5f, static_cast<float>(kNaN))) == StellarClass::Unclassified);
}

TEST_CASE("objects without BP-RP fainter than the L8V locus are T dwarfs when red, not when blue") {
    const Classifier& classifier = Classifier::shipped();
    // T7V of Pecaut & Mamajek: M_J 15.83; its M_G is not tabulated, so 21.0 stands for "fainter than L8V
    // (20.0)". G-J = 5.2 (red).
    const Classification t_dwarf = classifier.classifyAbsolute(21.0, kNaN, kNaN, 15.83, kNaN);
    CHECK(t_dwarf.stellar_class == StellarClass::T);
    CHECK(t_dwarf.spectral_code == doctest::Approx(87.0).epsilon(0.01));
    // An early T without a usable M_J subtype still counts as T.
    CHECK(classifier.classifyAbsolute(20.6, kNaN, kNaN, 14.5, kNaN).stellar_class == StellarClass::T);
    // The coolest Montreal DA model at log g 9.0 (1500 K): M_G 21.281, G-RP 21.281 - 21.785 = -0.504.
    CHECK(classifier.classifyAbsolute(21.281, kNaN, -0.504).stellar_class != StellarClass::T);
}

TEST_CASE("the classifier gives white dwarfs a Teff and a mass") {
    // Sirius B (published-figures.md section 3, from the 10 pc catalogue: M_G 11.39, BP-RP -0.28, DA1.9;
    // DA1.9 means Teff ~ 50400/1.9 = 26500 K by the spectral-type convention, from memory). A loose check:
    // hot (> 15000 K) and of typical white-dwarf mass (0.5-1.2 Msun).
    const Classification sirius_b = Classifier::shipped().classifyAbsolute(11.39, -0.28);
    REQUIRE(sirius_b.stellar_class == StellarClass::WhiteDwarf);
    CHECK(sirius_b.teff_k > 15000.0);
    CHECK(sirius_b.mass_msun > 0.5);
    CHECK(sirius_b.mass_msun < 1.2);
}

TEST_CASE("Y dwarfs classify as Y from WISE W1, W2 and M_J (MKO) without 2MASS") {
    // The 23 Y dwarfs of the Kirkpatrick et al. 2019 (ApJS 240, 19) compilation: parallaxes, MKO J where
    // measured ("-" where not), WISE W1 and W2 (W1 is mostly an upper limit, given here as the magnitude a
    // catalogue would hold). No Gaia or 2MASS photometry: the best match over J, W1, W2 (BandMatch.h). The
    // issue asks for >= 80% Y. Not an independent check: the Y-dwarf relations are the locus's M_J and
    // W1-W2 (which its source took from Kirkpatrick et al. 2019) and M_W2 recalled from Kirkpatrick et al.
    // 2019/2021 (from memory), fitted to samples that include these objects. The independent side is in
    // the Best et al. 2021 test below: its T8-T9.5 dwarfs must stay T. Measured: 19 Y, 4 T (Y0 dwarfs with
    // M_W2 14.5-14.6 and M_J 19.7-20.1, on the T9.5 side of the relations; one overluminous >=Y1).
    const Classifier& classifier = Classifier::shipped();
    int rows = 0, y_dwarfs = 0;
    std::map<std::string, int> assigned;
    for (const auto& fields : referenceRows("y_dwarfs_kirkpatrick2019_photometry.csv",
                                            "source,SpT,J_MKO,W1_mag,W2_mag,plx_mas,plx_err")) {
        PhotometricInput input;
        input.j_mag = referenceNumber(fields[2]);
        input.w1_mag = referenceNumber(fields[3]);
        input.w2_mag = referenceNumber(fields[4]);
        input.parallax_mas = referenceNumber(fields[5]);
        input.parallax_error_mas = referenceNumber(fields[6]);
        const Classification c = classifier.classify(input);
        ++assigned[std::string(className(c.stellar_class))];
        ++rows;
        y_dwarfs += c.stellar_class == StellarClass::Y ? 1 : 0;
    }
    std::ostringstream counts;
    for (const auto& [name, count] : assigned) {
        counts << name << ' ' << count << "; ";
    }
    MESSAGE("Kirkpatrick et al. 2019 Y dwarfs: " << counts.str());
    CHECK(rows == 23);
    CHECK(y_dwarfs >= 0.8 * rows);
    CHECK(assigned["T"] + y_dwarfs == rows); // the rest T
}

TEST_CASE("ultracool dwarfs of Best et al. 2021 classify from the bands each row has") {
    // Best, Liu, Magnier & Dupuy 2021 (AJ 161, 42) ultracool-dwarf compilation (columns copied to
    // tests/reference/; the two copies hold the same 356 rows in the same order): parallaxes, Gaia DR2 G
    // (40 rows), 2MASS J/H/Ks, MKO J/K, WISE W1/W2 with their errors, and literature types. 2MASS J and Ks
    // where the sheet has them, otherwise MKO J and K, as the census's j and ks fields would hold whichever
    // a catalogue lists (late-T MKO and 2MASS J differ by a few tenths, inside the relations' scatter; from
    // memory). The reference type is the optical one for M and L dwarfs and the near-infrared one otherwise
    // (the usual standards of each range; common practice, no source). The issue asks for letter agreement
    // >= 0.9, median |subtype difference| <= 1.5 and every member of the 25 pc volume-limited sample
    // (Best20b_vollim_sample = Y) classified. Rows without G (most) take the best match (BandMatch.h).
    const Classifier& classifier = Classifier::shipped();
    const auto rows = referenceRows("ultracool_best2021_photometry.csv",
                                    "name,spt_opt,spt_ir,plx_formula,plxerr_formula,G_DR2,J_2MASS,"
                                    "Ks_2MASS,W1,W2,Best20b_vollim_sample");
    const auto photometry = referenceRows(
        "ultracool_best2021_inspect.csv",
        "name,spt_opt,spt_ir,g_P1,gerr_P1,G_BP_DR2,G_BPerr_DR2,G_DR2,Gerr_DR2,G_RP_DR2,G_RPerr_DR2,J_2MASS,"
        "Jerr_2MASS,ref_J_2MASS,H_2MASS,Herr_2MASS,Ks_2MASS,Kserr_2MASS,J_MKO,Jerr_MKO,K_MKO,Kerr_MKO,W1,"
        "W1err,W2,W2err,plx_formula,plxerr_formula,ref_plx_formula,plx_DR2,plxerr_DR2,RUWE_DR2,"
        "MJ_2MASS_formula,dist_J_2MASS_formula");
    REQUIRE(rows.size() == photometry.size());
    int compared = 0, agreeing = 0, unclassified = 0, members = 0, members_classified = 0;
    int late_t = 0, late_t_as_y = 0;
    std::vector<double> subtype_differences;
    std::map<std::string, int> confusion;
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const auto& fields = rows[i];
        const auto& bands = photometry[i];
        REQUIRE(bands[0] == fields[0]);
        const auto number = [&](std::size_t column) { return referenceNumber(bands[column]); };
        PhotometricInput input;
        input.parallax_mas = referenceNumber(fields[3]);
        input.parallax_error_mas = referenceNumber(fields[4]);
        input.g_mag = referenceNumber(fields[5]);
        const bool two_mass_j = !std::isnan(number(11));
        input.j_mag = two_mass_j ? number(11) : number(18);
        input.j_error_mag = two_mass_j ? number(12) : number(19);
        input.h_mag = number(14);
        input.h_error_mag = number(15);
        const bool two_mass_ks = !std::isnan(number(16));
        input.ks_mag = two_mass_ks ? number(16) : number(20);
        input.ks_error_mag = two_mass_ks ? number(17) : number(21);
        input.w1_mag = number(22);
        input.w1_error_mag = number(23);
        input.w2_mag = number(24);
        input.w2_error_mag = number(25);
        if (!(input.parallax_mas >= 5.0 * input.parallax_error_mas)) {
            continue; // the census leaves these unclassified by design (parallax S/N < 5)
        }
        const Classification c = classifier.classify(input);
        const bool classified = c.stellar_class != StellarClass::Unclassified;
        if (fields[10] == "Y") {
            ++members;
            members_classified += classified ? 1 : 0;
        }
        const LiteratureType optical = parseLiteratureType(fields[1]);
        const LiteratureType infrared = parseLiteratureType(fields[2]);
        const bool optical_standard = optical.parsed && (optical.stellar_class == StellarClass::M ||
                                                         optical.stellar_class == StellarClass::L);
        const LiteratureType& reference = optical_standard || !infrared.parsed ? optical : infrared;
        if (!reference.parsed || !reference.spectral_code) {
            continue;
        }
        if (!classified) {
            ++unclassified;
            continue;
        }
        ++compared;
        agreeing += c.stellar_class == reference.stellar_class ? 1 : 0;
        ++confusion[std::string(className(reference.stellar_class)) + "->" +
                    std::string(className(c.stellar_class))];
        subtype_differences.push_back(std::abs(c.spectral_code - *reference.spectral_code));
        if (*reference.spectral_code >= 88.0 && *reference.spectral_code < 90.0) {
            ++late_t;
            late_t_as_y += c.stellar_class == StellarClass::Y ? 1 : 0;
        }
    }
    std::sort(subtype_differences.begin(), subtype_differences.end());
    const double median_difference = subtype_differences[subtype_differences.size() / 2];
    std::ostringstream table;
    for (const auto& [pair, count] : confusion) {
        table << pair << ' ' << count << "; ";
    }
    const double agreement = static_cast<double>(agreeing) / compared;
    MESSAGE("Best et al. 2021: " << compared << " compared, letter agreement " << agreement
                                 << ", median |subtype difference| " << median_difference << ", "
                                 << unclassified << " unclassified; volume-limited members classified "
                                 << members_classified << " of " << members << "; T8-T9.5 classified Y "
                                 << late_t_as_y << " of " << late_t << "; " << table.str());
    CHECK(agreement >= 0.9);
    CHECK(median_difference <= 1.5);
    CHECK(members == 140);
    CHECK(members_classified == members);
    // The independent side of the Y-dwarf relations (see the Kirkpatrick et al. 2019 test): late T dwarfs
    // of this sheet that are not Y stay T; a tenth is allowed for the T9.5/Y0 boundary (chosen here).
    CHECK(late_t > 80);
    CHECK(late_t_as_y <= 0.1 * late_t);
}

TEST_CASE("a star's categories at many distances are those of its whole classification at each") {
    // censusCategoriesAt() gathers the bands once and skips the Teff, mass and white-dwarf parameters; the
    // categories must not move. Inputs over every path: Gaia colours or none, the near and mid infrared,
    // Johnson B/V for the band match, white dwarfs (blue and faint), and bands too few to classify; each at
    // eight distance moduli from -2 to 12 mag.
    const Classifier& classifier = Classifier::shipped();
    std::mt19937_64 random(12);
    std::uniform_real_distribution<double> uniform(0.0, 1.0);
    const auto maybe = [&](double value, double present) { return uniform(random) < present ? value : kNaN; };
    std::map<Category, int> seen;
    int mismatches = 0;
    std::array<float, 8> moduli;
    std::array<Category, 8> categories;
    for (int i = 0; i < 50000; ++i) {
        PhotometricInput input;
        const double abs_g = -2.0 + 24.0 * uniform(random);
        const double bp_rp = -0.5 + 5.5 * uniform(random);
        const double modulus = -2.0 + 10.0 * uniform(random);
        input.g_mag = maybe(abs_g + modulus, 0.9);
        input.bp_mag = maybe(input.g_mag + 0.4 * bp_rp, 0.7);
        input.rp_mag = maybe(input.g_mag - 0.6 * bp_rp, 0.8);
        const double j = input.g_mag - (0.5 + 1.2 * bp_rp + 2.0 * uniform(random));
        input.j_mag = maybe(std::isnan(j) ? abs_g + modulus - 3.0 : j, 0.6);
        input.j_error_mag = 0.03;
        input.h_mag = maybe(input.j_mag - 0.5 * uniform(random), 0.5);
        input.h_error_mag = 0.03;
        input.ks_mag = maybe(input.j_mag - 1.5 * uniform(random), 0.6);
        input.ks_error_mag = 0.03;
        input.w1_mag = maybe(abs_g + modulus - 4.0 - 3.0 * uniform(random), 0.3);
        input.w1_error_mag = 0.05;
        input.w2_mag = maybe(input.w1_mag - 2.0 * uniform(random), 0.8);
        input.w2_error_mag = 0.05;
        input.v_mag = maybe(abs_g + modulus + 0.3 * bp_rp, 0.15);
        input.v_error_mag = 0.02;
        input.b_mag = maybe(input.v_mag + 0.5 * bp_rp, 0.5);
        input.b_error_mag = 0.02;
        for (std::size_t k = 0; k < moduli.size(); ++k) {
            moduli[k] =
                static_cast<float>(modulus - 4.0 + 1.2 * static_cast<double>(k) + 0.3 * uniform(random));
        }
        classifier.censusCategoriesAt(input, moduli, categories);
        for (std::size_t k = 0; k < moduli.size(); ++k) {
            PhotometricInput at = input;
            at.distance_modulus_mag = moduli[k];
            const Category whole = censusCategory(classifier.classify(at));
            ++seen[whole];
            if (categories[k] != whole && ++mismatches <= 5) {
                FAIL_CHECK("input " << i << " modulus " << moduli[k] << ": category " << int(categories[k])
                                    << ", whole classification " << int(whole));
            }
        }
    }
    CHECK(mismatches == 0);
    // The inputs reach the classes and the unclassified reasons: at least 30 categories, white dwarfs among
    // them.
    CHECK(seen.size() >= 30);
    CHECK(seen.count(categoryOf(StellarClass::WhiteDwarf, 0.0)) == 1);
}
