#include "photometry/SpectralType.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <map>
#include <sstream>
#include <string>
#include <vector>

using namespace starcensus::photometry;

namespace {

constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();

/// One expected reading. `flags` lists the set booleans: u uncertain, p peculiar, e emission,
/// l lower limit, c composite.
struct ExpectedType {
    const char* text;
    StellarClass stellar_class;
    double spectral_code; // kNoValue: none
    LuminosityClass luminosity_class = LuminosityClass::Unstated;
    const char* flags = "";
    SubdwarfPrefix subdwarf = SubdwarfPrefix::None;
    SurfaceGravity gravity = SurfaceGravity::Unstated;
    const char* white_dwarf_letters = "";
    double white_dwarf_temperature_index = kNoValue;
};

bool hasFlag(const ExpectedType& expected, char flag) {
    return std::string_view(expected.flags).find(flag) != std::string_view::npos;
}

void checkOptional(const std::optional<double>& actual, double expected) {
    if (std::isnan(expected)) {
        CHECK_FALSE(actual.has_value());
    } else {
        REQUIRE(actual.has_value());
        CHECK(*actual == doctest::Approx(expected));
    }
}

/// Named columns of a reference CSV without quoted fields (the spectral-type files under tests/reference/).
std::vector<std::vector<std::string>> readColumns(const std::string& path,
                                                  const std::vector<std::string>& names) {
    std::ifstream file(path);
    REQUIRE_MESSAGE(file, path);
    const auto split = [](const std::string& line) {
        std::vector<std::string> fields;
        std::stringstream stream(line);
        std::string field;
        while (std::getline(stream, field, ',')) {
            fields.push_back(field);
        }
        if (!line.empty() && line.back() == ',') {
            fields.emplace_back();
        }
        return fields;
    };
    std::string line;
    std::getline(file, line);
    const auto header = split(line);
    std::vector<std::size_t> indices;
    for (const auto& name : names) {
        const auto it = std::find(header.begin(), header.end(), name);
        REQUIRE_MESSAGE(it != header.end(), name);
        indices.push_back(static_cast<std::size_t>(it - header.begin()));
    }
    std::vector<std::vector<std::string>> columns(names.size());
    while (std::getline(file, line)) {
        const auto fields = split(line);
        REQUIRE(fields.size() == header.size());
        for (std::size_t i = 0; i < indices.size(); ++i) {
            columns[i].push_back(fields[indices[i]]);
        }
    }
    return columns;
}

/// Parses every string, checks each is parsed or refused with a reason, and returns counts by class name
/// (plus "refused: empty" and "refused: other").
std::map<std::string, int> countByClass(const std::vector<std::string>& types) {
    std::map<std::string, int> counts;
    for (const auto& text : types) {
        const LiteratureType type = parseLiteratureType(text);
        CHECK_MESSAGE((type.parsed ? type.reason.empty() : !type.reason.empty()), text);
        if (type.parsed) {
            counts[std::string(className(type.stellar_class))]++;
        } else {
            counts[type.reason == "empty" ? "refused: empty" : "refused: other"]++;
            if (type.reason != "empty") {
                MESSAGE("refused '" << text << "': " << type.reason);
            }
        }
    }
    std::ostringstream summary;
    for (const auto& [name, count] : counts) {
        summary << name << " " << count << "; ";
    }
    MESSAGE(summary.str());
    return counts;
}

int sumOf(const std::map<std::string, int>& counts, std::initializer_list<const char*> names) {
    int total = 0;
    for (const char* name : names) {
        const auto it = counts.find(name);
        total += it == counts.end() ? 0 : it->second;
    }
    return total;
}

} // namespace

TEST_CASE("literature spectral types: tricky cases read exactly") {
    using L = LuminosityClass;
    using S = StellarClass;
    // Expected readings follow the conventions cited in SpectralType.h (MK system; Sion et al. 1983 for white
    // dwarfs; Allers & Liu 2013 and the optical Greek-letter classes for gravity), all from memory.
    const std::vector<ExpectedType> cases = {
        {"M5.5V", S::M, 65.5, L::Dwarf},
        {"K2.5 V", S::K, 52.5, L::Dwarf},
        {"G8IV-V", S::G, 48.0, L::Dwarf}, // a range reads as its fainter class
        {"G0 IV/V", S::G, 40.0, L::Dwarf},
        {"DA7.8", S::WhiteDwarf, kNoValue, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Unstated,
         "A", 7.8},
        {"DQ9", S::WhiteDwarf, kNoValue, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Unstated, "Q",
         9.0},
        {"DC", S::WhiteDwarf, kNoValue, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Unstated, "C"},
        {"DBQA5", S::WhiteDwarf, kNoValue, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Unstated,
         "BQA", 5.0},
        {"D?", S::WhiteDwarf, kNoValue, L::Unstated, "u"},
        {"DA+dM", S::WhiteDwarf, kNoValue, L::Unstated, "c", SubdwarfPrefix::None, SurfaceGravity::Unstated,
         "A"},
        {"sdM1", S::M, 61.0, L::Unstated, "", SubdwarfPrefix::Subdwarf},
        {"esdL6", S::L, 76.0, L::Unstated, "", SubdwarfPrefix::Extreme},
        {"usdM5", S::M, 65.0, L::Unstated, "", SubdwarfPrefix::Ultra},
        {"d/sdM9", S::M, 69.0, L::Unstated, "u", SubdwarfPrefix::Subdwarf},
        {"(sd)T9", S::T, 89.0, L::Unstated, "u", SubdwarfPrefix::Subdwarf},
        {"L0: INT-G", S::L, 70.0, L::Unstated, "u", SubdwarfPrefix::None, SurfaceGravity::Intermediate},
        {"M6: VL-G", S::M, 66.0, L::Unstated, "u", SubdwarfPrefix::None, SurfaceGravity::VeryLow},
        {"L7 pec FLD-G", S::L, 77.0, L::Unstated, "p", SubdwarfPrefix::None, SurfaceGravity::Field},
        {"L3.5 beta", S::L, 73.5, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Intermediate},
        {"L3beta", S::L, 73.0, L::Unstated, "", SubdwarfPrefix::None, SurfaceGravity::Intermediate},
        {"M6: gamma", S::M, 66.0, L::Unstated, "u", SubdwarfPrefix::None, SurfaceGravity::VeryLow},
        {"T8pec", S::T, 88.0, L::Unstated, "p"},
        {"T8.5p", S::T, 88.5, L::Unstated, "p"},
        {"L9 pec (red)", S::L, 79.0, L::Unstated, "p"},
        {"Y0.5 (pec?)", S::Y, 90.5, L::Unstated, "pu"},
        {"\xE2\x89\xA5Y4", S::Y, 94.0, L::Unstated, "l"}, // "≥Y4"
        {">=Y4", S::Y, 94.0, L::Unstated, "l"},
        {"Y1: (or later)", S::Y, 91.0, L::Unstated, "ul"},
        {"M8+L0", S::M, 68.0, L::Unstated, "c"},
        {"L7.5+T0.5", S::L, 77.5, L::Unstated, "c"},
        {"kA2hA5mA7 V", S::A, 25.0, L::Dwarf, "p"}, // the hydrogen-line type, flagged peculiar (Am)
        {"M0.0 V", S::M, 60.0, L::Dwarf},
        {"Y0", S::Y, 90.0},
        {"T7.5", S::T, 87.5},
        {"L6::", S::L, 76.0, L::Unstated, "u"},
        {"M4.5Ve", S::M, 64.5, L::Dwarf, "e"},
        {"K5 IVe", S::K, 55.0, L::Subgiant, "e"},
        {"M3 V(e)", S::M, 63.0, L::Dwarf, "e"},
        {"B3 Vk", S::B, 13.0, L::Dwarf},
        {"F5 III", S::F, 35.0, L::Giant},
        {"A0 Iab", S::A, 20.0, L::Supergiant},
        {"dM4", S::M, 64.0, L::Dwarf}, // Mount Wilson prefix
        {"m5.5v", S::M, 65.5, L::Dwarf},
        {" k7 v ", S::K, 57.0, L::Dwarf},
        {"M", S::M, kNoValue},
        {"C5", S::Evolved, kNoValue},
    };
    for (const auto& expected : cases) {
        CAPTURE(expected.text);
        const LiteratureType type = parseLiteratureType(expected.text);
        REQUIRE_MESSAGE(type.parsed, type.reason);
        CHECK(type.reason.empty());
        CHECK(type.stellar_class == expected.stellar_class);
        checkOptional(type.spectral_code, expected.spectral_code);
        CHECK(type.luminosity_class == expected.luminosity_class);
        CHECK(type.subdwarf == expected.subdwarf);
        CHECK(type.gravity == expected.gravity);
        CHECK(type.uncertain == hasFlag(expected, 'u'));
        CHECK(type.peculiar == hasFlag(expected, 'p'));
        CHECK(type.emission == hasFlag(expected, 'e'));
        CHECK(type.lower_limit == hasFlag(expected, 'l'));
        CHECK(type.composite == hasFlag(expected, 'c'));
        CHECK(type.white_dwarf_letters == expected.white_dwarf_letters);
        checkOptional(type.white_dwarf_temperature_index, expected.white_dwarf_temperature_index);
    }
}

TEST_CASE("literature spectral types: blanks and nonsense are refused with a reason") {
    for (const char* blank : {"", "   ", "NaN", "nan", "null", "--", "..."}) {
        CAPTURE(blank);
        const LiteratureType type = parseLiteratureType(blank);
        CHECK_FALSE(type.parsed);
        CHECK(type.reason == "empty");
    }
    const auto refusedReason = [](const char* text) {
        const LiteratureType type = parseLiteratureType(text);
        CHECK_FALSE(type.parsed);
        CHECK(type.stellar_class == StellarClass::Unclassified);
        return type.reason;
    };
    CHECK(refusedReason("foo") == "not understood: 'oo' in 'foo'");
    CHECK(refusedReason("Q5") == "no spectral class letter at 'Q5'");
    CHECK(refusedReason("M12 V") == "subtype 12 is not below 10");
    CHECK(refusedReason("M8+xyz") == "companion: no spectral class letter at 'xyz'");
    CHECK(refusedReason("M5 V 42") == "not understood: '42' in 'M5 V 42'");
    CHECK(refusedReason("kA2 V") == "metallic-line type without a hydrogen ('h') part");
}

TEST_CASE("literature spectral types: the CARMENES M-dwarf catalogue") {
    // Cifuentes et al. (arXiv:2412.12264), CARMENES input catalogue IX, column SpT
    // (tests/reference/carmenes_ix_photometry.csv).
    const auto columns =
        readColumns(STARCENSUS_SOURCE_DIR "/tests/reference/carmenes_ix_photometry.csv", {"Karmn", "SpT"});
    const auto counts = countByClass(columns[1]);
    const int rows = static_cast<int>(columns[1].size());
    CHECK(rows == 2634);
    CHECK(sumOf(counts, {"refused: empty", "refused: other"}) == 0); // measured: every SpT reads
    // Measured: 2510 M, 53 K, 27 white dwarfs (all its "D..." types), 29 A/F/G companions, 15 L and T, i.e.
    // the first letters of the strings. An M-dwarf catalogue with companions: M + K is 97.3%, not 99%.
    CHECK(sumOf(counts, {"M"}) == 2510);
    CHECK(sumOf(counts, {"K"}) == 53);
    CHECK(sumOf(counts, {"WD"}) == 27);
    CHECK(static_cast<double>(sumOf(counts, {"M", "K"})) / rows >= 0.97);
}

TEST_CASE("literature spectral types: the ultracool dwarfs of Best et al. 2021") {
    // Best, Liu, Magnier & Dupuy 2021, AJ 161, 42 (UltracoolSheet), columns spt_opt and spt_ir
    // (tests/reference/ultracool_best2021_spectral_types.csv). An M6-Y2 sample: every type is M, L, T or Y.
    const auto columns =
        readColumns(STARCENSUS_SOURCE_DIR "/tests/reference/ultracool_best2021_spectral_types.csv",
                    {"name", "spt_opt", "spt_ir"});
    const auto optical = countByClass(columns[1]);
    const auto infrared = countByClass(columns[2]);
    for (const auto* counts : {&optical, &infrared}) {
        CHECK(sumOf(*counts, {"refused: other"}) == 0);
        CHECK(sumOf(*counts, {"M", "L", "T", "Y", "refused: empty"}) == static_cast<int>(columns[1].size()));
    }
    // Measured, and equal to the first letters of the strings ("esdL6" -> L, "d/sdM9" -> M, "(sd)T9" -> T).
    CHECK(optical == std::map<std::string, int>{{"M", 22}, {"L", 58}, {"T", 31}, {"refused: empty", 245}});
    CHECK(infrared ==
          std::map<std::string, int>{{"M", 16}, {"L", 57}, {"T", 243}, {"Y", 23}, {"refused: empty", 17}});
}

TEST_CASE("literature spectral types: the Y dwarfs of Kirkpatrick et al. 2019") {
    // Kirkpatrick et al. 2019, ApJS 240, 19 compilation, column SpT
    // (tests/reference/y_dwarfs_kirkpatrick2019_spectral_types.csv): all 23 are Y dwarfs.
    const auto columns =
        readColumns(STARCENSUS_SOURCE_DIR "/tests/reference/y_dwarfs_kirkpatrick2019_spectral_types.csv",
                    {"source", "SpT"});
    const auto counts = countByClass(columns[1]);
    CHECK(columns[1].size() == 23);
    CHECK(sumOf(counts, {"Y"}) == 23);
}
