// inspect as the way into an unknown table: column profiles (checked against astropy and Python's csv
// module), ranked candidates for the fields the mapping leaves unmapped (on a FITS fixture with only
// non-standard names and units, its gzip and CSV copies, and on published tables as they name their
// columns), and nothing applied that the mapping rules do not map themselves.
#include "photometry/catalog/CatalogInspection.h"
#include "tests/photometry/catalog/FitsFixture.h"

#include <doctest/doctest.h>
#include <nlohmann/json.hpp>

#include <cmath>
#include <filesystem>
#include <limits>
#include <sstream>

using namespace starcensus::photometry;
using starcensus::testing::FixtureColumn;
using starcensus::testing::FixtureTable;
using starcensus::testing::makeColumn;
using starcensus::testing::ScratchDirectory;
using starcensus::testing::valueColumn;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Names as small compilations write them (PX, SIG_PX, G, GBP, J, K, ...), parallaxes in arcsec, and
// columns that must not be taken for a field: a distance, an absolute magnitude, a colour, a reference
// and a vector.
FixtureTable nonStandardTable() {
    FixtureColumn ids = makeColumn("ID", "1K");
    ids.integers = {11, 12, 13, 14};
    FixtureColumn observations = valueColumn("NOBS", "1J", "", {12.0, kNaN, 30.0, 7.0});
    observations.tnull = -1;
    FixtureColumn reference = makeColumn("PX_REF", "8A");
    reference.texts = {"Kirk19", "Best20", "", "Kirk19"};
    FixtureColumn flux =
        valueColumn("FLUX", "3E", "", {1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0});
    const auto mag = [](std::string name, std::vector<double> values) {
        return valueColumn(std::move(name), "1E", "mag", std::move(values));
    };
    return {"ODD",
            {ids,
             valueColumn("ALPHA", "1D", "deg", {10.5, 200.25, 359.0, 0.125}),
             valueColumn("DELTA", "1D", "deg", {-30.0, 45.5, 89.0, -89.5}),
             valueColumn("PX", "1E", "arcsec", {0.1005, 0.00225, -0.0005, kNaN}),
             valueColumn("SIG_PX", "1E", "arcsec", {0.00025, 0.0005, 0.00075, 0.001}),
             valueColumn("X_ERR", "1E", "mas", {0.3, 0.6, 0.9, 1.2}, "stat.error;pos.parallax.trig;stat.fit"),
             valueColumn("DIST", "1E", "pc", {9.95, 444.4, kNaN, kNaN}),
             mag("G", {9.5, 17.25, 20.75, 12.0}),
             mag("E_G", {0.001, 0.002, 0.01, 0.003}),
             mag("GBP", {10.0, kNaN, 21.5, 12.5}),
             mag("GRP", {9.0, 16.5, kNaN, 11.5}),
             mag("BP_RP", {1.0, kNaN, kNaN, 1.0}),
             mag("M_G", {9.5, 9.5, 9.5, 9.5}),
             mag("J", {7.0, 15.0, kNaN, 10.0}),
             mag("EJ", {0.02, 0.03, kNaN, 0.02}),
             mag("H", {6.5, 14.5, kNaN, 9.5}),
             mag("K", {6.25, 14.0, kNaN, 9.25}),
             mag("E_K", {0.02, 0.05, kNaN, 0.02}),
             mag("V", {11.0, 19.0, 22.0, 13.5}),
             reference,
             flux,
             observations}};
}

// The same table as CSV: names and values only (CSV states no units or UCDs).
std::string asCsv(const FixtureTable& table) {
    std::ostringstream text;
    std::vector<const FixtureColumn*> scalars;
    for (const auto& column : table.columns) {
        if (column.tform != "3E") {
            scalars.push_back(&column);
        }
    }
    for (std::size_t c = 0; c < scalars.size(); ++c) {
        text << (c == 0 ? "" : ",") << scalars[c]->name;
    }
    text << "\n";
    for (std::size_t row = 0; row < 4; ++row) {
        for (std::size_t c = 0; c < scalars.size(); ++c) {
            const FixtureColumn& column = *scalars[c];
            text << (c == 0 ? "" : ",");
            if (!column.texts.empty()) {
                text << column.texts[row];
            } else if (!column.integers.empty()) {
                text << *column.integers[row];
            } else if (!std::isnan(column.values[row])) {
                text << column.values[row];
            }
        }
        text << "\n";
    }
    return text.str();
}

CatalogInspection inspectOne(const std::string& path, const ScanSettings& settings = {}) {
    auto inspections = inspectCatalogs({path}, settings);
    REQUIRE(inspections.size() == 1);
    CAPTURE(inspections[0].error);
    REQUIRE(inspections[0].error.empty());
    return std::move(inspections[0]);
}

std::vector<std::string> candidateNames(const CatalogInspection& inspection, CatalogField field) {
    std::vector<std::string> names;
    for (const auto& candidate : inspection.candidates[static_cast<std::size_t>(field)]) {
        names.push_back(inspection.table.columns[candidate.column_index].description.name);
    }
    return names;
}

const ColumnCandidate& best(const CatalogInspection& inspection, CatalogField field) {
    const auto& candidates = inspection.candidates[static_cast<std::size_t>(field)];
    REQUIRE_FALSE(candidates.empty());
    return candidates.front();
}

bool mapsNothing(const CatalogInspection& inspection) {
    const auto& fields = inspection.mapping.mapping.fields;
    return std::none_of(fields.begin(), fields.end(), [](const auto& field) { return field.has_value(); });
}

// The fields and the column the test expects on top, in the non-standard table.
const std::vector<std::pair<CatalogField, std::string>> kExpectedBest = {
    {CatalogField::SourceId, "ID"},
    {CatalogField::Ra, "ALPHA"},
    {CatalogField::Dec, "DELTA"},
    {CatalogField::Parallax, "PX"},
    {CatalogField::ParallaxError, "SIG_PX"},
    {CatalogField::G, "G"},
    {CatalogField::GError, "E_G"},
    {CatalogField::Bp, "GBP"},
    {CatalogField::Rp, "GRP"},
    {CatalogField::J, "J"},
    {CatalogField::JError, "EJ"},
    {CatalogField::H, "H"},
    {CatalogField::Ks, "K"},
    {CatalogField::KsError, "E_K"},
    {CatalogField::V, "V"}};

std::string lineStartingWith(const std::string& text, const std::string& prefix) {
    std::istringstream stream(text);
    std::string line;
    while (std::getline(stream, line)) {
        if (line.starts_with(prefix)) {
            return line;
        }
    }
    return "";
}

void checkProfileAgainstReference(const TableProfile& profile, const nlohmann::json& reference) {
    for (const auto& column : profile.columns) {
        const std::string& name = column.description.name;
        CAPTURE(name);
        if (column.kind == ColumnKind::Other) {
            CHECK_FALSE(reference.contains(name)); // vectors and logicals: profiled by neither
            continue;
        }
        REQUIRE(reference.contains(name));
        const auto& expected = reference[name];
        CHECK(column.nulls == expected["nulls"].get<std::int64_t>());
        CHECK(column.numbers == expected["numbers"].get<std::int64_t>());
        CHECK(column.texts == expected["texts"].get<std::int64_t>());
        if (column.numbers > 0) {
            // Both read the same stored values as doubles (float columns widened exactly): equal to
            // round-off of the TSCAL/TZERO arithmetic, relative 1e-12.
            CHECK(column.min == doctest::Approx(expected["min"].get<double>()).epsilon(1e-12));
            CHECK(column.max == doctest::Approx(expected["max"].get<double>()).epsilon(1e-12));
        }
    }
}

} // namespace

TEST_CASE("a table with only non-standard names: ranked candidates, nothing applied, on FITS, gzip, bzip2 "
          "and CSV") {
    const ScratchDirectory directory("starcensus-suggest");
    const std::string path = directory.file("odd.fits");
    const FixtureTable table = nonStandardTable();
    starcensus::testing::writeFitsTable(path, table);
    const std::string gz_path = directory.file("odd.fits.gz");
    starcensus::testing::gzipFile(path, gz_path);
    const std::string csv_path = directory.file("odd.csv");
    starcensus::testing::writeText(csv_path, asCsv(table));

    const CatalogInspection fits = inspectOne(path);
    CHECK(fits.hdus.size() == 2);
    CHECK(mapsNothing(fits)); // no name or UCD the rules know: every candidate is only a guess
    CHECK_FALSE(fits.scanned);
    for (const auto& [field, name] : kExpectedBest) {
        CAPTURE(fieldName(field));
        CHECK(fits.table.columns[best(fits, field).column_index].description.name == name);
    }
    // Scores and reasons as ColumnSuggestion.h defines them.
    CHECK(best(fits, CatalogField::Parallax).score == 50);
    CHECK(best(fits, CatalogField::Parallax).reasons == "name token px +30, unit arcsec +20");
    CHECK(candidateNames(fits, CatalogField::ParallaxError) == std::vector<std::string>{"SIG_PX", "X_ERR"});
    CHECK(
        fits.candidates[static_cast<std::size_t>(CatalogField::ParallaxError)][1].reasons ==
        "UCD stat.error;pos.parallax.trig;stat.fit close to stat.error;pos.parallax.trig +25, unit mas +20");
    CHECK(best(fits, CatalogField::GError).reasons == "name token g +30, unit mag +20");
    CHECK(best(fits, CatalogField::Ks).reasons == "name token k +30, unit mag +20");
    // The colour names both bands, so it ranks below each band's own column; the distance, the absolute
    // magnitude, the reference and the vector are nobody's candidates.
    CHECK(candidateNames(fits, CatalogField::Bp) == std::vector<std::string>{"GBP", "BP_RP"});
    CHECK(candidateNames(fits, CatalogField::Rp) == std::vector<std::string>{"GRP", "BP_RP"});
    CHECK(fits.candidates[static_cast<std::size_t>(CatalogField::Bp)][1].score == 25);
    CHECK(candidateNames(fits, CatalogField::Parallax) == std::vector<std::string>{"PX"});
    CHECK(candidateNames(fits, CatalogField::G) == std::vector<std::string>{"G"});
    CHECK(candidateNames(fits, CatalogField::SpectralType).empty());
    CHECK(candidateNames(fits, CatalogField::W1).empty());

    // What inspect prints: the columns, the missing required fields, the error a run would stop with and
    // the suggested options (with the unit the column states, so no --unit is needed).
    const std::string text = formatInspection({fits});
    CHECK(text.find("    21  FLUX  ") != std::string::npos);
    const std::string px_row = lineStartingWith(text, "    4   PX  ");
    CHECK(px_row.starts_with("    4   PX      number  1E     arcsec  -   "));
    CHECK(px_row.ends_with("  1      -0.0005 to 0.1005")); // float32 values at 6 significant digits
    CHECK(text.find("  required fields not mapped yet: parallax parallax_error\n") != std::string::npos);
    CHECK(text.find("  a run stops with: " + path + " [HDU 1 ODD]: no column for parallax (") !=
          std::string::npos);
    CHECK(text.find("    --column source_id=ID --column ra=ALPHA --column dec=DELTA --column parallax=PX "
                    "--column parallax_error=SIG_PX ") != std::string::npos);
    CHECK(text.find("    # column = parallax=PX\n") != std::string::npos);
    CHECK(text.find("--unit parallax") == std::string::npos);

    // Every input format: the gzip and bzip2 copies say the same; the CSV copy loses the units (so the
    // parallax candidates score 30, not 50) but ranks the same columns first.
    const CatalogInspection gz = inspectOne(gz_path);
    const std::string bz2_path = directory.file("odd.fits.bz2");
    starcensus::testing::runReferencePython("bzip2_file.py", "'" + path + "' '" + bz2_path + "'");
    const CatalogInspection bz2 = inspectOne(bz2_path);
    const CatalogInspection csv = inspectOne(csv_path);
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const auto field = static_cast<CatalogField>(i);
        CAPTURE(fieldName(field));
        CHECK(candidateNames(gz, field) == candidateNames(fits, field));
        CHECK(candidateNames(bz2, field) == candidateNames(fits, field));
        CHECK(fits.table.columns.size() == gz.table.columns.size());
        if (!candidateNames(fits, field).empty()) {
            CHECK(candidateNames(csv, field).front() == candidateNames(fits, field).front());
        }
    }
    CHECK(best(csv, CatalogField::Parallax).score == 30);
    CHECK(mapsNothing(csv));
    // A CSV parallax without a unit needs one: the suggestion leaves UNIT for the user to fill in.
    CHECK(formatInspection({csv}).find("--unit parallax=UNIT --unit parallax_error=UNIT") !=
          std::string::npos);

    // Taking the suggestions as --column (and the unit, for CSV) makes a run's mapping complete.
    ScanSettings settings;
    for (const auto& [field, name] : kExpectedBest) {
        settings.user_columns[std::string(fieldName(field))] = name;
    }
    const CatalogInspection mapped = inspectOne(path, settings);
    CHECK(mapped.scanned);
    CHECK(mapped.mapping.mapping[CatalogField::Parallax]->scale_to_canonical == 1000.0); // arcsec -> mas
    CHECK(mapped.scan.parallax_max_mas == doctest::Approx(100.5).epsilon(1e-6));         // float column
    settings.user_units = {{"parallax", "arcsec"}, {"parallax_error", "arcsec"}};
    CHECK(inspectOne(csv_path, settings).scan.counts.rows_read == 4);
}

TEST_CASE(
    "column profiles agree with astropy (FITS, every TFORM) and Python's csv module (published tables)") {
    const ScratchDirectory directory("starcensus-suggest");
    const std::string path = directory.file("mixed.fits");
    starcensus::testing::writeFitsTable(path, starcensus::testing::mixedTypeTable(500, 7));
    const TableProfile fits = profileTable(path, "");
    CHECK(fits.rows == 500);
    checkProfileAgainstReference(fits, nlohmann::json::parse(starcensus::testing::runReferencePython(
                                           "profile_columns.py", "'" + path + "' 1")));

    const std::string odd = directory.file("odd.fits");
    starcensus::testing::writeFitsTable(odd, nonStandardTable());
    const TableProfile odd_profile = profileTable(odd, "1");
    checkProfileAgainstReference(odd_profile, nlohmann::json::parse(starcensus::testing::runReferencePython(
                                                  "profile_columns.py", "'" + odd + "' 1")));
    CHECK(odd_profile.columns.back().nulls == 1); // TNULL
    CHECK(odd_profile.columns[19].samples == std::vector<std::string>{"Kirk19", "Best20"});

    for (const char* name : {"carmenes_ix_errors.csv", "ultracool_best2021_inspect.csv",
                             "y_dwarfs_kirkpatrick2019_photometry.csv"}) {
        CAPTURE(name);
        const std::string table = std::string(STARCENSUS_SOURCE_DIR "/tests/reference/") + name;
        checkProfileAgainstReference(profileTable(table, ""),
                                     nlohmann::json::parse(starcensus::testing::runReferencePython(
                                         "profile_columns.py", "'" + table + "'")));
    }
}

TEST_CASE("published tables as they name their columns: candidates for the fields the mapping misses") {
    const std::string reference = STARCENSUS_SOURCE_DIR "/tests/reference/";

    // Cifuentes et al. (arXiv:2412.12264), CARMENES input catalogue IX: Gaia names for the astrometry,
    // errors written eG_mag, eBP_mag, eJ_mag, ... and absolute magnitudes MG_mag/eMG_mag beside them.
    const CatalogInspection carmenes = inspectOne(reference + "carmenes_ix_errors.csv");
    CHECK(carmenes.scanned);
    CHECK(carmenes.mapping.mapping[CatalogField::G]->column_name == "G_mag");
    const std::vector<std::pair<CatalogField, std::string>> carmenes_errors = {
        {CatalogField::GError, "eG_mag"},   {CatalogField::BpError, "eBP_mag"},
        {CatalogField::RpError, "eRP_mag"}, {CatalogField::JError, "eJ_mag"},
        {CatalogField::HError, "eH_mag"},   {CatalogField::KsError, "eKs_mag"}};
    for (const auto& [field, name] : carmenes_errors) {
        CAPTURE(fieldName(field));
        CHECK(candidateNames(carmenes, field) == std::vector<std::string>{name});
        CHECK(best(carmenes, field).reasons.ends_with("+30, unit mag in the name +10"));
    }
    // The Gaia identifier ranks above the table's own running numbers.
    CHECK(candidateNames(carmenes, CatalogField::SourceId) ==
          std::vector<std::string>{"GaiaDR3_id", "ID_star"});

    // Best et al. 2021 (AJ 161, 42), UltracoolSheet: every field needs --column; Gaia DR2 bands beside
    // Pan-STARRS g, 2MASS beside MKO and UKIDSS, references, absolute magnitudes and distances.
    const CatalogInspection ultracool = inspectOne(reference + "ultracool_best2021_inspect.csv");
    CHECK_FALSE(ultracool.scanned);
    const std::vector<std::pair<CatalogField, std::vector<std::string>>> ultracool_expected = {
        {CatalogField::Parallax, {"plx_formula"}},
        {CatalogField::ParallaxError, {"plxerr_formula"}},
        {CatalogField::G, {"G_DR2", "g_P1"}},
        {CatalogField::GError, {"Gerr_DR2", "gerr_P1"}},
        {CatalogField::Bp, {"G_BP_DR2"}},
        {CatalogField::BpError, {"G_BPerr_DR2"}},
        {CatalogField::Rp, {"G_RP_DR2"}},
        {CatalogField::RpError, {"G_RPerr_DR2"}},
        {CatalogField::J, {"J_2MASS", "J_MKO"}},
        {CatalogField::JError, {"Jerr_2MASS", "Jerr_MKO"}},
        {CatalogField::H, {"H_2MASS"}},
        {CatalogField::Ks, {"Ks_2MASS", "K_MKO"}},
        {CatalogField::KsError, {"Kserr_2MASS", "Kerr_MKO"}},
        {CatalogField::Ruwe, {"RUWE_DR2"}},
        {CatalogField::SpectralType, {"spt_opt", "spt_ir"}}};
    for (const auto& [field, names] : ultracool_expected) {
        CAPTURE(fieldName(field));
        CHECK(candidateNames(ultracool, field) == names);
    }
    CHECK(best(ultracool, CatalogField::G).reasons == "name token g +30, release dr2 +10");
    CHECK(ultracool.candidates[static_cast<std::size_t>(CatalogField::J)][1].reasons ==
          "name token j +30, other survey mko -10");
    CHECK(best(ultracool, CatalogField::Ruwe).reasons ==
          "name token ruwe +30, release dr2 +10, every cell null -30");
    CHECK(ultracool.mapping.mapping[CatalogField::W1]->column_name == "W1"); // mapped by name as before

    // Kirkpatrick et al. 2019 (ApJS 240, 19) Y dwarfs: parallaxes named plx_mas/plx_err, MKO J with "-"
    // for not measured (a missing value), no Gaia G at all.
    const CatalogInspection y_dwarfs = inspectOne(reference + "y_dwarfs_kirkpatrick2019_photometry.csv");
    CHECK(best(y_dwarfs, CatalogField::Parallax).reasons == "name token plx +30, unit mas in the name +10");
    CHECK(best(y_dwarfs, CatalogField::Parallax).name_unit == "mas");
    CHECK(candidateNames(y_dwarfs, CatalogField::ParallaxError) == std::vector<std::string>{"plx_err"});
    CHECK(best(y_dwarfs, CatalogField::J).reasons == "name token j +30, other survey mko -10");
    CHECK(candidateNames(y_dwarfs, CatalogField::G).empty());
    const std::string text = formatInspection({y_dwarfs});
    CHECK(text.find("--unit parallax=mas --unit parallax_error=UNIT") != std::string::npos);
    CHECK(text.find("    [ ]  census:          none: a run stops (missing parallax parallax_error)\n") !=
          std::string::npos);
    CHECK(text.find("    [x]  mid infrared:    W1-W2 classes for objects without J-Ks\n") !=
          std::string::npos);
    CHECK(
        text.find("    [ ]  near infrared:   L/T/Y dwarfs from Gaia bands only (T dwarfs by G-RP) (missing j "
                  "ks)\n") != std::string::npos);
    // Mapped as a user would from those candidates, the table still cannot be run: the name rule maps
    // the text column "source" to source_id. inspect reads the file, flags the column (and says how to
    // leave it unmapped) and quotes the scan's error instead of stopping.
    ScanSettings settings;
    settings.user_columns = {{"parallax", "plx_mas"}, {"parallax_error", "plx_err"}, {"j", "J_MKO"}};
    settings.user_units = {{"parallax", "mas"}, {"parallax_error", "mas"}};
    const CatalogInspection mapped =
        inspectOne(reference + "y_dwarfs_kirkpatrick2019_photometry.csv", settings);
    CHECK_FALSE(mapped.scanned);
    CHECK(mapped.scan_error == reference + "y_dwarfs_kirkpatrick2019_photometry.csv line 2: column source "
                                           "(source_id): 'WISEA J030237.52-581740.3' is not a number");
    const std::string mapped_text = formatInspection({mapped});
    CHECK(mapped_text.find(
              "name source; 23 cells not numbers ('WISEA J030237.52-581740.3'): a run refuses them "
              "(--column source_id=none leaves the field unmapped)\n") != std::string::npos);
    CHECK(mapped_text.find("  a run stops with: " + mapped.scan_error + "\n") != std::string::npos);
}

TEST_CASE("the mapping text quotes names a shell would split and reads back as the same options") {
    const ScratchDirectory directory("starcensus-suggest");
    const std::string path = directory.file("it's here.csv");
    starcensus::testing::writeText(path, "parallax,parallax_error,G mag\n10.5,0.5,12.25\n");
    ScanSettings settings;
    settings.user_columns = {{"g", "G mag"}};
    const CatalogInspection inspection = inspectOne(path, settings);
    CHECK(inspection.scanned);
    CHECK(mappingAsOptions(inspection) ==
          "--column parallax=parallax --column parallax_error=parallax_error --column 'g=G mag'");
    CHECK(mappingAsIni(inspection) ==
          "column = parallax=parallax\ncolumn = parallax_error=parallax_error\ncolumn = g=G mag\n");
    std::string quoted_path = "'"; // POSIX sh quoting: ' ends the word, \' is a quote, ' reopens
    quoted_path.append(directory.file("it'\\''s here.csv")).append("'");
    CHECK(formatInspection({inspection}).find("    starcensus run " + quoted_path + " --column parallax=") !=
          std::string::npos);
}

TEST_CASE("inspect reports an unreadable table as that file's one-line error and goes on with the others") {
    const ScratchDirectory directory("starcensus-suggest");
    const std::string ragged = directory.file("ragged.csv");
    starcensus::testing::writeText(ragged, "parallax,parallax_error,G\n10,0.5,12\n11,0.5\n");
    const std::string truncated = directory.file("truncated.fits");
    starcensus::testing::writeFitsTable(truncated, starcensus::testing::mixedTypeTable(2000, 3));
    std::filesystem::resize_file(truncated, std::filesystem::file_size(truncated) - 3 * 2880);
    const std::string truncated_gz = directory.file("truncated.fits.gz");
    starcensus::testing::gzipFile(truncated, truncated_gz);
    const std::string good = directory.file("good.fits");
    starcensus::testing::writeFitsTable(good, nonStandardTable());

    const auto inspections = inspectCatalogs({ragged, truncated, truncated_gz, good}, {});
    REQUIRE(inspections.size() == 4);
    CHECK(inspections[0].error == ragged + " line 3: 2 fields, the header has 3");
    CHECK(inspections[1].error.starts_with(truncated + " [HDU 1 MIXED]: cannot read rows "));
    CHECK(inspections[2].error.starts_with(truncated_gz + " [HDU 1 MIXED]: cannot read rows "));
    CHECK(inspections[2].error.ends_with(" (truncated file?): the gzip stream ends early"));
    CHECK(inspections[3].error.empty());
    CHECK(inspections[3].table.columns.size() == 22);
    const std::string text = formatInspection(inspections);
    CHECK(text.find("  error: " + inspections[0].error + "\n") != std::string::npos);
    CHECK(text.find("  table: HDU 1 ODD, 4 rows, 22 columns\n") != std::string::npos);
}
