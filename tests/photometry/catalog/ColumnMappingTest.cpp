#include "FitsFixture.h"

#include "photometry/catalog/ColumnMapping.h"

#include <doctest/doctest.h>

#include <cmath>

using namespace starcensus::photometry;

namespace {

std::vector<ColumnDescription> describe(std::initializer_list<std::array<std::string, 3>> columns) {
    std::vector<ColumnDescription> result;
    for (const auto& [name, unit, ucd] : columns) {
        result.push_back({static_cast<int>(result.size() + 1), name, "D", ucd, unit});
    }
    return result;
}

std::string mappingError(const std::vector<ColumnDescription>& columns, const MappingRequest& request = {}) {
    return starcensus::testing::inputErrorOf([&] { resolveColumns(columns, request, "cat.fits [HDU 1]"); });
}

} // namespace

TEST_CASE("Gaia DR3 column names map by name with their units") {
    const auto columns = describe({{"source_id", "", ""},
                                   {"ra", "deg", ""},
                                   {"dec", "deg", ""},
                                   {"parallax", "mas", ""},
                                   {"parallax_error", "mas", ""},
                                   {"pmra", "mas.yr**-1", ""},
                                   {"pmdec", "mas yr-1", ""},
                                   {"phot_g_mean_mag", "mag", ""},
                                   {"phot_bp_mean_mag", "mag", ""},
                                   {"phot_rp_mean_mag", "mag", ""},
                                   {"phot_g_mean_flux_over_error", "", ""},
                                   {"ruwe", "", ""}});
    const ColumnMapping mapping = resolveColumns(columns, {}, "gaia.fits");
    CHECK(mapping[CatalogField::Parallax]->column_name == "parallax");
    CHECK(mapping[CatalogField::Parallax]->route == MappingRoute::Name);
    CHECK(mapping[CatalogField::Parallax]->unit_source == "TUNIT4");
    CHECK(mapping[CatalogField::Pmra]->scale_to_canonical == 1.0);
    CHECK(mapping[CatalogField::Bp]->column_name == "phot_bp_mean_mag");
    CHECK(mapping[CatalogField::GError]->flux_over_error);
    CHECK(mapping[CatalogField::Ruwe]->column_name == "ruwe");
    CHECK_FALSE(mapping[CatalogField::J].has_value());
    CHECK_FALSE(mapping[CatalogField::BpError].has_value());
}

TEST_CASE("2MASS and VizieR names map by name, case-insensitively") {
    const auto columns = describe({{"Plx", "mas", ""},
                                   {"e_Plx", "mas", ""},
                                   {"Gmag", "mag", ""},
                                   {"e_Gmag", "mag", ""},
                                   {"j_m", "mag", ""},
                                   {"H_M", "mag", ""},
                                   {"k_m", "mag", ""},
                                   {"j_msigcom", "mag", ""},
                                   {"e_Kmag", "mag", ""},
                                   {"RA_ICRS", "deg", ""},
                                   {"DE_ICRS", "deg", ""},
                                   {"pmDE", "mas/yr", ""}});
    const ColumnMapping mapping = resolveColumns(columns, {}, "vizier.fits");
    CHECK(mapping[CatalogField::ParallaxError]->column_name == "e_Plx");
    CHECK_FALSE(mapping[CatalogField::GError]->flux_over_error);
    CHECK(mapping[CatalogField::H]->column_name == "H_M");
    CHECK(mapping[CatalogField::Ks]->column_name == "k_m");
    // 2MASS PSC's total uncertainty and VizieR's e_Kmag (2MASS PSC and VizieR II/246 column names).
    CHECK(mapping[CatalogField::JError]->column_name == "j_msigcom");
    CHECK(mapping[CatalogField::KsError]->column_name == "e_Kmag");
    CHECK_FALSE(mapping[CatalogField::JError]->flux_over_error);
    CHECK_FALSE(mapping[CatalogField::HError].has_value());
    CHECK(mapping[CatalogField::Dec]->column_name == "DE_ICRS");
    CHECK(mapping[CatalogField::Pmdec]->column_name == "pmDE");
}

TEST_CASE("Johnson B, V and WISE W1, W2 map by release names and by UCD") {
    // AllWISE source-table names (w1mpro, w1sigmpro) and VizieR's Vmag/e_Vmag, Bmag/e_Bmag (AllWISE
    // explanatory supplement and VizieR II/328 column names; from memory).
    auto columns = describe({{"Plx", "mas", ""},
                             {"e_Plx", "mas", ""},
                             {"Gmag", "mag", ""},
                             {"Bmag", "mag", ""},
                             {"e_Bmag", "mag", ""},
                             {"Vmag", "mag", ""},
                             {"e_Vmag", "mag", ""},
                             {"w1mpro", "mag", ""},
                             {"w1sigmpro", "mag", ""},
                             {"W2mag", "mag", ""},
                             {"e_W2mag", "mag", ""}});
    ColumnMapping mapping = resolveColumns(columns, {}, "bright.fits");
    CHECK(mapping[CatalogField::B]->column_name == "Bmag");
    CHECK(mapping[CatalogField::BError]->column_name == "e_Bmag");
    CHECK(mapping[CatalogField::V]->column_name == "Vmag");
    CHECK(mapping[CatalogField::VError]->column_name == "e_Vmag");
    CHECK(mapping[CatalogField::W1]->column_name == "w1mpro");
    CHECK(mapping[CatalogField::W1Error]->column_name == "w1sigmpro");
    CHECK(mapping[CatalogField::W2]->column_name == "W2mag");
    CHECK(mapping[CatalogField::W2Error]->column_name == "e_W2mag");
    CHECK_FALSE(mapping[CatalogField::Bp].has_value()); // Johnson B is not Gaia BP
    // UCD1+ words em.IR.3-4um, em.IR.4-8um and em.opt.V (the IVOA UCD1+ vocabulary, version 1.5).
    columns = describe({{"parallax", "mas", ""},
                        {"parallax_error", "mas", ""},
                        {"G", "mag", "phot.mag;em.opt"},
                        {"MAG_V", "mag", "phot.mag;em.opt.V"},
                        {"F1", "mag", "phot.mag;em.IR.3-4um"},
                        {"F2", "mag", "phot.mag;em.IR.4-8um"},
                        {"S2", "mag", "stat.error;phot.mag;em.IR.4-8um"}});
    mapping = resolveColumns(columns, {}, "ucd.fits");
    CHECK(mapping[CatalogField::V]->column_name == "MAG_V");
    CHECK(mapping[CatalogField::W1]->column_name == "F1");
    CHECK(mapping[CatalogField::W2]->column_name == "F2");
    CHECK(mapping[CatalogField::W2Error]->column_name == "S2");
    CHECK(mapping[CatalogField::W2]->route == MappingRoute::Ucd);
    CHECK(fieldFromName("W2_error") == CatalogField::W2Error);
}

TEST_CASE("UCDs beat names and the user's mapping beats both") {
    // UCD1+ words as used by the Gaia archive (Gaia DR3 documentation, gaia_source datamodel).
    const auto columns = describe({{"parallax", "mas", ""},
                                   {"PLX_TRIG", "mas", "pos.parallax.trig"},
                                   {"SIG_PLX", "mas", "stat.error;pos.parallax.trig"},
                                   {"parallax_error", "mas", ""},
                                   {"MAG_G", "mag", "phot.mag;em.opt"},
                                   {"MAG_BP", "mag", "PHOT.MAG;EM.OPT.B"},
                                   {"SNR_G", "", "stat.snr;phot.flux;em.opt"},
                                   {"KS", "mag", "phot.mag;em.IR.K;meta.main"},
                                   {"KS_SIG", "mag", "stat.error;phot.mag;em.IR.K"},
                                   {"RA_MAIN", "deg", "pos.eq.ra;meta.main"},
                                   {"RA_OTHER", "deg", "pos.eq.ra"},
                                   {"ID", "", "meta.id;meta.main"}});
    ColumnMapping mapping = resolveColumns(columns, {}, "ucd.fits");
    CHECK(mapping[CatalogField::Parallax]->column_name == "PLX_TRIG");
    CHECK(mapping[CatalogField::Parallax]->route == MappingRoute::Ucd);
    CHECK(mapping[CatalogField::Parallax]->matched_by == "UCD pos.parallax.trig");
    CHECK(mapping[CatalogField::ParallaxError]->column_name == "SIG_PLX");
    CHECK(mapping[CatalogField::Bp]->column_name == "MAG_BP");
    CHECK(mapping[CatalogField::GError]->column_name == "SNR_G");
    CHECK(mapping[CatalogField::GError]->flux_over_error);
    CHECK(mapping[CatalogField::Ks]->column_name == "KS");
    CHECK(mapping[CatalogField::KsError]->column_name == "KS_SIG");
    CHECK(mapping[CatalogField::KsError]->route == MappingRoute::Ucd);
    CHECK(mapping[CatalogField::Ra]->column_name == "RA_MAIN");
    CHECK(mapping[CatalogField::SourceId]->column_name == "ID");

    MappingRequest request;
    request.user_columns = {{"Parallax", "PARALLAX"}};
    mapping = resolveColumns(columns, request, "ucd.fits");
    CHECK(mapping[CatalogField::Parallax]->column_name == "parallax");
    CHECK(mapping[CatalogField::Parallax]->route == MappingRoute::User);
    CHECK(mapping[CatalogField::Parallax]->matched_by == "--column parallax=PARALLAX");
}

TEST_CASE("parallax units convert to mas and must be stated") {
    CHECK(*unitScale(CatalogField::Parallax, "arcsec") == 1000.0);
    CHECK(*unitScale(CatalogField::Parallax, "uas") == doctest::Approx(1e-3).epsilon(1e-15));
    CHECK(*unitScale(CatalogField::ParallaxError, "MAS") == 1.0);
    CHECK_FALSE(unitScale(CatalogField::Parallax, "").has_value());
    CHECK_FALSE(unitScale(CatalogField::Parallax, "deg").has_value());
    CHECK(*unitScale(CatalogField::Ra, "rad") == doctest::Approx(57.29577951308232).epsilon(1e-15));
    CHECK(*unitScale(CatalogField::Ra, "") == 1.0);
    CHECK(*unitScale(CatalogField::Pmdec, "arcsec/yr") == 1000.0);
    CHECK(*unitScale(CatalogField::Pmra, "mas.a**-1") == 1.0);
    CHECK_FALSE(unitScale(CatalogField::G, "Jy").has_value());

    const auto in_arcsec = describe({{"plx", "arcsec", ""}, {"e_plx", "uas", ""}, {"gmag", "", ""}});
    const ColumnMapping mapping = resolveColumns(in_arcsec, {}, "x.fits");
    CHECK(canonicalValue(*mapping[CatalogField::Parallax], 0.0125) == doctest::Approx(12.5).epsilon(1e-15));
    CHECK(canonicalValue(*mapping[CatalogField::ParallaxError], 250.0) ==
          doctest::Approx(0.25).epsilon(1e-15));

    CHECK(mappingError(describe({{"plx", "", ""}, {"e_plx", "mas", ""}, {"gmag", "", ""}})) ==
          "cat.fits [HDU 1]: column plx (parallax) has no unit; state it with TUNIT1 or --unit parallax=UNIT "
          "(accepted: mas, milliarcsec, marcsec, arcsec, arcsecond, uas, \xC2\xB5"
          "as, microarcsec, \xCE\xBC"
          "as)");
    CHECK(mappingError(describe({{"plx", "deg", ""}, {"e_plx", "mas", ""}, {"gmag", "", ""}}))
              .starts_with("cat.fits [HDU 1]: column plx (parallax) has unit 'deg'; accepted: mas"));
}

TEST_CASE("a flux-over-error ratio becomes a magnitude error") {
    // sigma_m = 2.5 / ln(10) / SNR (first-order error propagation, common practice, no source).
    ResolvedColumn column;
    column.flux_over_error = true;
    CHECK(canonicalValue(column, 100.0) == doctest::Approx(2.5 / std::log(10.0) / 100.0).epsilon(1e-15));
    CHECK(std::isnan(canonicalValue(column, 0.0)));
    CHECK(std::isnan(canonicalValue(column, std::nan(""))));
}

TEST_CASE("ambiguous, missing and mistyped mappings are one-line errors naming the columns") {
    CHECK(mappingError(describe(
              {{"parallax", "mas", ""}, {"plx", "mas", ""}, {"e_plx", "mas", ""}, {"gmag", "", ""}})) ==
          "cat.fits [HDU 1]: field parallax is ambiguous: columns parallax (name parallax), plx (name plx) "
          "all match; "
          "choose one with --column parallax=COLUMN");
    CHECK(mappingError(describe({{"A", "mas", "pos.parallax"},
                                 {"B", "mas", "pos.parallax.trig"},
                                 {"e_plx", "mas", ""},
                                 {"gmag", "", ""}}))
              .find("columns A (UCD pos.parallax), B (UCD pos.parallax.trig) all match") !=
          std::string::npos);
    CHECK(
        mappingError(describe({{"plx", "mas", ""}, {"gmag", "", ""}})) ==
        "cat.fits [HDU 1]: no column for parallax_error (no UCD match, no column named parallax_error e_plx "
        "plx_error parallax_err e_parallax); name it with --column parallax_error=COLUMN");

    MappingRequest request;
    request.user_columns = {{"g", "PHOT_G"}};
    CHECK(mappingError(describe({{"plx", "mas", ""}, {"e_plx", "mas", ""}, {"gmag", "", ""}}), request) ==
          "cat.fits [HDU 1]: --column g=PHOT_G: no column PHOT_G (columns: plx e_plx gmag)");
    request.user_columns = {{"colour", "X"}};
    CHECK(
        mappingError(describe({{"plx", "mas", ""}}), request).starts_with("--column colour: unknown field"));
}

TEST_CASE("CSV parallaxes take mas only from the Gaia names") {
    MappingRequest request;
    request.gaia_names_imply_mas = true;
    const auto gaia =
        describe({{"parallax", "", ""}, {"parallax_error", "", ""}, {"phot_g_mean_mag", "", ""}});
    const ColumnMapping mapping = resolveColumns(gaia, request, "stars.csv");
    CHECK(mapping[CatalogField::Parallax]->unit == "mas");
    CHECK(mapping[CatalogField::Parallax]->unit_source == "Gaia name (mas)");

    const auto other = describe({{"plx", "", ""}, {"parallax_error", "", ""}, {"gmag", "", ""}});
    CHECK(mappingError(other, request).find("column plx (parallax) has no unit") != std::string::npos);
    request.user_units = {{"parallax", "arcsec"}};
    const ColumnMapping with_unit = resolveColumns(other, request, "stars.csv");
    CHECK(with_unit[CatalogField::Parallax]->scale_to_canonical == 1000.0);
    CHECK(with_unit[CatalogField::Parallax]->unit_source == "--unit");
}

TEST_CASE("spectral_type maps by UCD src.spType or a generic name; SpT_opt beside SpT_IR is not ambiguous") {
    const auto required = std::vector<ColumnDescription>{
        {1, "parallax", "D", "", "mas"}, {2, "parallax_error", "D", "", "mas"}, {3, "gmag", "D", "", ""}};
    auto with = [&](std::vector<ColumnDescription> extra) {
        auto columns = required;
        for (auto& column : extra) {
            column.number = static_cast<int>(columns.size() + 1);
            columns.push_back(std::move(column));
        }
        return columns;
    };
    const auto by_ucd = resolveColumns(with({{0, "TYPE", "10A", "src.spType", ""}}), {}, "cat.fits");
    CHECK(by_ucd[CatalogField::SpectralType]->column_name == "TYPE");
    CHECK(by_ucd[CatalogField::SpectralType]->matched_by == "UCD src.spType");
    const auto by_name = resolveColumns(with({{0, "SP_TYPE", "10A", "", ""}}), {}, "cat.fits");
    CHECK(by_name[CatalogField::SpectralType]->route == MappingRoute::Name);
    // Typed by two spectra: neither name is a candidate, so nothing is mapped and nothing is ambiguous.
    const auto both =
        resolveColumns(with({{0, "SpT_opt", "8A", "", ""}, {0, "SpT_IR", "8A", "", ""}}), {}, "cat.fits");
    CHECK_FALSE(both[CatalogField::SpectralType].has_value());
    CHECK(canonicalUnit(CatalogField::SpectralType).empty());
    CHECK(acceptedUnits(CatalogField::SpectralType) == "none");
    CHECK(mappingError(with({{0, "spt", "8A", "", "mag"}})) ==
          "cat.fits [HDU 1]: column spt (spectral_type) has unit 'mag'; accepted: none");
}

TEST_CASE("attemptColumns keeps every field's problem and maps the rest; resolveColumns throws the first") {
    // An ambiguous parallax, no G, a BP in a unit bands refuse, and a J the names map.
    const auto columns = describe({{"parallax", "mas", ""},
                                   {"plx", "mas", ""},
                                   {"parallax_error", "mas", ""},
                                   {"bp_mag", "deg", ""},
                                   {"j_m", "mag", ""}});
    const MappingAttempt attempt = attemptColumns(columns, {}, "cat.fits [HDU 1]");
    const auto problem = [&](CatalogField field) {
        return attempt.problems[static_cast<std::size_t>(field)];
    };
    CHECK(problem(CatalogField::Parallax).starts_with("cat.fits [HDU 1]: field parallax is ambiguous"));
    CHECK(problem(CatalogField::G).empty()); // optional: a table without G is classified from what it has
    CHECK_FALSE(attempt.mapping[CatalogField::G]);
    CHECK(problem(CatalogField::Bp) ==
          "cat.fits [HDU 1]: column bp_mag (bp) has unit 'deg'; accepted: none, mag");
    CHECK(problem(CatalogField::ParallaxError).empty());
    CHECK(attempt.mapping[CatalogField::ParallaxError]->column_name == "parallax_error");
    CHECK(attempt.mapping[CatalogField::J]->column_name == "j_m");
    CHECK_FALSE(attempt.mapping[CatalogField::Parallax]);
    CHECK_FALSE(attempt.mapping[CatalogField::Bp]);
    CHECK(mappingError(columns) == problem(CatalogField::Parallax)); // first in field order
    CHECK(isRequiredField(CatalogField::ParallaxError));
    CHECK_FALSE(isRequiredField(CatalogField::G));
    CHECK_FALSE(isRequiredField(CatalogField::Bp));
}
