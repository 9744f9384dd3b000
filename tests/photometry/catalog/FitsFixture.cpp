#include "FitsFixture.h"

#include <fitsio.h>
#include <zlib.h>

#include "census/Random.h"
#include "photometry/base/InputError.h"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <random>
#include <stdexcept>

namespace starcensus::testing {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

void check(int status, const std::string& what) {
    if (status != 0) {
        char text[FLEN_STATUS] = {};
        fits_get_errstatus(status, text);
        fits_clear_errmsg();
        throw std::runtime_error("fixture: " + what + ": cfitsio status " + std::to_string(status) + " " +
                                 text);
    }
}

void writeDoubles(fitsfile* file, int number, const std::vector<double>& values) {
    int status = 0;
    // Runs of values and of nulls, so large fixtures take few calls.
    std::size_t start = 0;
    while (start < values.size()) {
        const bool null = std::isnan(values[start]);
        std::size_t end = start;
        while (end < values.size() && std::isnan(values[end]) == null) {
            ++end;
        }
        const auto first = static_cast<LONGLONG>(start + 1);
        const auto count = static_cast<LONGLONG>(end - start);
        if (null) {
            fits_write_col_null(file, number, first, 1, count, &status);
        } else {
            fits_write_col(file, TDOUBLE, number, first, 1, count, const_cast<double*>(values.data() + start),
                           &status);
        }
        check(status, "writing column " + std::to_string(number));
        start = end;
    }
}

void writeIntegers(fitsfile* file, int number, const FixtureColumn& column) {
    int status = 0;
    const bool is_unsigned = column.tform.find('W') != std::string::npos;
    for (std::size_t row = 0; row < column.integers.size(); ++row) {
        const auto first = static_cast<LONGLONG>(row + 1);
        if (!column.integers[row]) {
            fits_write_col_null(file, number, first, 1, 1, &status);
        } else if (is_unsigned) {
            auto value = static_cast<ULONGLONG>(*column.integers[row]);
            fits_write_col(file, TULONGLONG, number, first, 1, 1, &value, &status);
        } else {
            auto value = static_cast<LONGLONG>(*column.integers[row]);
            fits_write_col(file, TLONGLONG, number, first, 1, 1, &value, &status);
        }
        check(status, "writing integer column " + std::to_string(number));
    }
}

void writeTable(fitsfile* file, const FixtureTable& table) {
    int status = 0;
    std::vector<char*> names;
    std::vector<char*> forms;
    std::vector<char*> units;
    for (const auto& column : table.columns) {
        names.push_back(const_cast<char*>(column.name.c_str()));
        forms.push_back(const_cast<char*>(column.tform.c_str()));
        units.push_back(const_cast<char*>(column.unit.c_str()));
    }
    fits_create_tbl(file, BINARY_TBL, 0, static_cast<int>(table.columns.size()), names.data(), forms.data(),
                    units.data(), table.extname.empty() ? nullptr : table.extname.c_str(), &status);
    check(status, "creating table");
    for (std::size_t i = 0; i < table.columns.size(); ++i) {
        const FixtureColumn& column = table.columns[i];
        const std::string suffix = std::to_string(i + 1);
        if (!column.ucd.empty()) {
            fits_write_key_str(file, ("TUCD" + suffix).c_str(), column.ucd.c_str(), nullptr, &status);
        }
        if (column.tnull) {
            fits_write_key_lng(file, ("TNULL" + suffix).c_str(), *column.tnull, nullptr, &status);
        }
        if (column.tscal) {
            fits_write_key_dbl(file, ("TSCAL" + suffix).c_str(), *column.tscal, -15, nullptr, &status);
        }
        if (column.tzero) {
            fits_write_key_dbl(file, ("TZERO" + suffix).c_str(), *column.tzero, -15, nullptr, &status);
        }
        check(status, "writing keywords of column " + suffix);
    }
    fits_set_hdustruc(file, &status); // re-read the keywords so writes apply TSCAL, TZERO and TNULL
    check(status, "re-reading the table header");
    for (std::size_t i = 0; i < table.columns.size(); ++i) {
        const FixtureColumn& column = table.columns[i];
        const int number = static_cast<int>(i + 1);
        if (!column.texts.empty()) {
            std::vector<char*> texts;
            for (const auto& text : column.texts) {
                texts.push_back(const_cast<char*>(text.c_str()));
            }
            fits_write_col(file, TSTRING, number, 1, 1, static_cast<LONGLONG>(texts.size()), texts.data(),
                           &status);
            check(status, "writing text column " + column.name);
        } else if (column.tform.find('L') != std::string::npos) {
            std::vector<char> flags(column.values.begin(), column.values.end());
            fits_write_col(file, TLOGICAL, number, 1, 1, static_cast<LONGLONG>(flags.size()), flags.data(),
                           &status);
            check(status, "writing logical column " + column.name);
        } else if (!column.integers.empty()) {
            writeIntegers(file, number, column);
        } else {
            writeDoubles(file, number, column.values);
        }
    }
}

} // namespace

FixtureColumn makeColumn(std::string name, std::string tform, std::string unit, std::string ucd) {
    FixtureColumn column;
    column.name = std::move(name);
    column.tform = std::move(tform);
    column.unit = std::move(unit);
    column.ucd = std::move(ucd);
    return column;
}

FixtureColumn valueColumn(std::string name, std::string tform, std::string unit, std::vector<double> values,
                          std::string ucd) {
    FixtureColumn column = makeColumn(std::move(name), std::move(tform), std::move(unit), std::move(ucd));
    column.values = std::move(values);
    return column;
}

FixtureTable mixedTypeTable(std::size_t rows, std::uint64_t seed) {
    starcensus::census::Xoshiro256 random(seed);
    auto sometimes = [&](double probability, double value) {
        return random.uniform() < probability ? kNaN : value;
    };
    FixtureColumn ids = makeColumn("SRC", "1W", "", "meta.id;meta.main"); // K with TZERO = 2^63
    FixtureColumn designation = makeColumn("designation", "20A");
    FixtureColumn flag = valueColumn("flag", "1L", "", {});
    FixtureColumn vector = valueColumn("vec", "3E", "", {});
    std::vector<double> ra, dec, plx, plx_error, pmra, pmdec, g, bp, rp, snr, bp_error, j, h, ks, ruwe;
    for (std::size_t i = 0; i < rows; ++i) {
        ids.integers.emplace_back(static_cast<std::int64_t>(random() >> 2));
        designation.texts.push_back("star " + std::to_string(i));
        flag.values.push_back(static_cast<double>(i % 2));
        for (int k = 0; k < 3; ++k) {
            vector.values.push_back(random.normal());
        }
        ra.push_back(360.0 * random.uniform());
        dec.push_back(std::asin(2.0 * random.uniform() - 1.0));                   // radians
        plx.push_back(sometimes(0.05, 0.002 + 0.01 * random.normal()));           // arcsec
        const double error_micro = std::floor(random.uniform() * 2000.0) - 100.0; // some zero and negative
        plx_error.push_back(sometimes(0.03, error_micro * 1e-3));
        pmra.push_back(sometimes(0.05, 0.1 * random.normal())); // arcsec/yr
        pmdec.push_back(sometimes(0.05, std::round(random.normal() * 3000.0) * 0.01));
        g.push_back(sometimes(0.02, 8.0 + 13.0 * random.uniform()));
        bp.push_back(sometimes(0.1, 15.0 + std::round(random.normal() * 3000.0) * 0.001));
        rp.push_back(sometimes(0.1, 7.0 + 13.0 * random.uniform()));
        snr.push_back(sometimes(0.02, 3000.0 * random.uniform()));
        bp_error.push_back(sometimes(0.1, 0.2 * random.uniform()));
        j.push_back(sometimes(0.3, std::floor(random.uniform() * 250.0) * 0.1));
        h.push_back(sometimes(0.3, std::floor(random.uniform() * 2.0e7) * 1e-6));
        ks.push_back(20.0 + std::round(random.normal() * 5000.0) * 0.001);
        ruwe.push_back(std::floor(random.uniform() * 4.0e9));
    }
    FixtureColumn plx_error_column =
        valueColumn("PLX_ERR", "1J", "mas", plx_error, "stat.error;pos.parallax");
    plx_error_column.tscal = 1e-3;
    plx_error_column.tnull = -1000000;
    FixtureColumn pmdec_column = valueColumn("pmdec", "1I", "mas/yr", pmdec);
    pmdec_column.tscal = 0.01;
    pmdec_column.tnull = -32768;
    FixtureColumn bp_column = valueColumn("phot_bp_mean_mag", "1I", "mag", bp);
    bp_column.tscal = 0.001;
    bp_column.tzero = 15.0;
    bp_column.tnull = -32768;
    FixtureColumn j_column = valueColumn("j_m", "1B", "mag", j);
    j_column.tscal = 0.1;
    j_column.tnull = 255;
    FixtureColumn h_column = valueColumn("h_m", "1K", "mag", h);
    h_column.tscal = 1e-6;
    h_column.tnull = -1;
    FixtureColumn ks_column = valueColumn("ks_m", "1I", "mag", ks);
    ks_column.tscal = 0.001;
    ks_column.tzero = 20.0;
    return {"MIXED",
            {ids, designation, valueColumn("RA", "1D", "deg", ra, "pos.eq.ra;meta.main"),
             valueColumn("DEC", "1E", "rad", dec, "pos.eq.dec;meta.main"), flag,
             valueColumn("PLX", "1E", "arcsec", plx, "pos.parallax"), plx_error_column, vector,
             valueColumn("pmra", "1D", "arcsec/yr", pmra), pmdec_column,
             valueColumn("phot_g_mean_mag", "1E", "mag", g), bp_column,
             valueColumn("phot_rp_mean_mag", "1D", "mag", rp),
             valueColumn("phot_g_mean_flux_over_error", "1E", "", snr),
             valueColumn("phot_bp_mean_mag_error", "1E", "mag", bp_error), j_column, h_column, ks_column,
             valueColumn("ruwe", "1V", "", ruwe)}};
}

std::size_t FixtureColumn::rows() const {
    return std::max({values.size(), integers.size(), texts.size()});
}

void writeFitsTables(const std::string& path, const std::vector<FixtureTable>& tables) {
    int status = 0;
    fitsfile* file = nullptr;
    fits_create_file(&file, ("!" + path).c_str(), &status);
    check(status, "creating " + path);
    fits_create_img(file, BYTE_IMG, 0, nullptr, &status);
    check(status, "writing the primary HDU");
    for (const auto& table : tables) {
        writeTable(file, table);
    }
    fits_close_file(file, &status);
    check(status, "closing " + path);
}

void writeFitsTable(const std::string& path, const FixtureTable& table) {
    writeFitsTables(path, {table});
}

void gzipFile(const std::string& source, const std::string& target) {
    std::ifstream input(source, std::ios::binary);
    const std::string bytes((std::istreambuf_iterator<char>(input)), std::istreambuf_iterator<char>());
    gzFile output = gzopen(target.c_str(), "wb");
    if (output == nullptr ||
        gzwrite(output, bytes.data(), static_cast<unsigned>(bytes.size())) !=
            static_cast<int>(bytes.size()) ||
        gzclose(output) != Z_OK) {
        throw std::runtime_error("fixture: cannot gzip " + source);
    }
}

std::string inputErrorOf(const std::function<void()>& action) {
    try {
        action();
    } catch (const InputError& error) {
        return error.what();
    }
    return "no error";
}

void writeText(const std::string& path, const std::string& text) {
    std::ofstream output(path, std::ios::binary);
    output << text;
    if (!output) {
        throw std::runtime_error("fixture: cannot write " + path);
    }
}

} // namespace starcensus::testing
