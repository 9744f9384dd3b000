#include "photometry/catalog/EcsvHeader.h"

#include "photometry/base/InputError.h"

#include <doctest/doctest.h>

using namespace starcensus::photometry;
using starcensus::InputError;

TEST_CASE("ECSV headers: columns, units, UCDs and the delimiter as astropy writes them") {
    // The layout of astropy's ascii.ecsv writer (ECSV 1.0, astropy APE 6): meta as an ordered map.
    const std::string yaml =
        "---\n"
        "delimiter: ','\n"
        "datatype:\n"
        "- name: source_id\n"
        "  datatype: int64\n"
        "  meta: !!omap\n"
        "  - {ucd: meta.id;meta.main}\n"
        "- {name: pmra, unit: mas / yr, datatype: float64, meta: {ucd: pos.pm;pos.eq.ra}}\n"
        "- {name: spt, datatype: string}\n"
        "schema: astropy-2.0\n";
    const EcsvHeader header = parseEcsvHeader(yaml, "t.ecsv");
    CHECK(header.delimiter == ',');
    REQUIRE(header.columns.size() == 3);
    CHECK(header.columns[0].name == "source_id");
    CHECK(header.columns[0].tform == "int64");
    CHECK(header.columns[0].ucd == "meta.id;meta.main");
    CHECK(header.columns[1].unit == "mas / yr");
    CHECK(header.columns[1].ucd == "pos.pm;pos.eq.ra");
    CHECK(header.columns[2].number == 3);
    CHECK(header.columns[2].unit.empty());
    CHECK(parseEcsvHeader("datatype:\n- {name: a, datatype: float32}\n", "t.ecsv").delimiter == ' ');
    CHECK(isEcsvSignature("# %ECSV 1.0"));
    CHECK_FALSE(isEcsvSignature("# a comment"));
}

TEST_CASE("malformed ECSV headers are one-line errors naming the file") {
    CHECK_THROWS_WITH_AS(parseEcsvHeader("delimiter: ','\n", "t.ecsv"),
                         "t.ecsv: ECSV header has no 'datatype' list of columns", InputError);
    CHECK_THROWS_WITH_AS(parseEcsvHeader("datatype:\n- {datatype: int64}\n", "t.ecsv"),
                         "t.ecsv: ECSV column 1 has no name", InputError);
    CHECK_THROWS_WITH_AS(
        parseEcsvHeader("delimiter: ';'\ndatatype:\n- {name: a, datatype: int8}\n", "t.ecsv"),
        "t.ecsv: ECSV delimiter ';' is neither a space nor a comma", InputError);
    CHECK_THROWS_WITH_AS(parseEcsvHeader("datatype:\n- {name: a, datatype: decimal}\n", "t.ecsv"),
                         "t.ecsv: ECSV column a has datatype 'decimal', not one of ECSV 1.0's", InputError);
    CHECK_THROWS_AS(parseEcsvHeader("datatype: [\n", "t.ecsv"), InputError);
}
