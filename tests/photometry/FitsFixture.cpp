#include "FitsFixture.h"

#include <fitsio.h>
#include <zlib.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <random>
#include <stdexcept>

namespace starcensus::testing {

namespace {

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

std::size_t FixtureColumn::rows() const {
    return std::max({values.size(), integers.size(), texts.size()});
}

TemporaryDirectory::TemporaryDirectory() {
    std::random_device entropy;
    path_ = std::filesystem::temp_directory_path() / ("starcensus-test-" + std::to_string(entropy()));
    std::filesystem::create_directories(path_);
}

TemporaryDirectory::~TemporaryDirectory() {
    std::error_code ignored;
    std::filesystem::remove_all(path_, ignored);
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

void writeText(const std::string& path, const std::string& text) {
    std::ofstream output(path, std::ios::binary);
    output << text;
    if (!output) {
        throw std::runtime_error("fixture: cannot write " + path);
    }
}

} // namespace starcensus::testing
