#include "reports/ReportInputs.h"

#include "photometry/base/InputError.h"

#include <fitsio.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <limits>
#include <memory>
#include <sstream>

namespace starcensus::reports {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr const char* kRadiusPrefix = "p_within_";
constexpr const char* kRadiusSuffix = "pc";

struct FitsCloser {
    void operator()(fitsfile* file) const {
        int status = 0;
        fits_close_file(file, &status);
    }
};

/// The sample table of sample.fits, opened read-only; every cfitsio failure becomes an InputError.
class SampleFile {
  public:
    explicit SampleFile(const std::filesystem::path& path) : where_(path.string()) {
        fitsfile* raw = nullptr;
        int status = 0;
        fits_open_table(&raw, where_.c_str(), READONLY, &status);
        file_.reset(raw);
        check(status, "cannot open the sample table");
        long rows = 0;
        fits_get_num_rows(file_.get(), &rows, &status);
        check(status, "cannot read the row count");
        rows_ = rows;
        int columns = 0;
        fits_get_num_cols(file_.get(), &columns, &status);
        for (int c = 1; c <= columns; ++c) {
            char keyword[FLEN_KEYWORD];
            char value[FLEN_VALUE] = {};
            fits_make_keyn("TTYPE", c, keyword, &status);
            fits_read_key(file_.get(), TSTRING, keyword, value, nullptr, &status);
            names_.emplace_back(value);
        }
        check(status, "cannot read the column names");
    }

    const std::vector<std::string>& columnNames() const { return names_; }

    std::vector<double> numbers(const std::string& name) const {
        std::vector<double> values(static_cast<std::size_t>(rows_));
        int status = 0;
        int any_null = 0;
        double null_value = kNaN;
        fits_read_col(file_.get(), TDOUBLE, columnNumber(name), 1, 1, rows_, &null_value, values.data(),
                      &any_null, &status);
        check(status, "column " + name + " is not numeric");
        return values;
    }

    std::vector<std::string> strings(const std::string& name) const {
        const int column = columnNumber(name);
        int status = 0;
        int type_code = 0;
        long repeat = 0;
        long width = 0;
        fits_get_coltype(file_.get(), column, &type_code, &repeat, &width, &status);
        check(status, "column " + name);
        if (type_code != TSTRING) {
            throw InputError(where_ + ": column " + name + " is not a string column");
        }
        std::vector<std::string> values;
        std::vector<char> cell(static_cast<std::size_t>(repeat) + 1);
        char* cells[] = {cell.data()};
        char null_value[] = "";
        for (long row = 1; row <= rows_; ++row) {
            int any_null = 0;
            fits_read_col(file_.get(), TSTRING, column, row, 1, 1, null_value, cells, &any_null, &status);
            check(status, "column " + name);
            values.emplace_back(cell.data());
        }
        return values;
    }

  private:
    int columnNumber(const std::string& name) const {
        const auto found = std::find(names_.begin(), names_.end(), name);
        if (found == names_.end()) {
            throw InputError(where_ + ": no column " + name);
        }
        return static_cast<int>(found - names_.begin()) + 1;
    }

    void check(int status, const std::string& doing) const {
        if (status != 0) {
            char text[FLEN_STATUS] = {};
            fits_get_errstatus(status, text);
            fits_clear_errmsg();
            throw InputError(where_ + ": " + doing + " (cfitsio: " + text + ")");
        }
    }

    std::string where_;
    std::unique_ptr<fitsfile, FitsCloser> file_;
    long rows_ = 0;
    std::vector<std::string> names_;
};

/// The radius of a p_within_<R>pc column ('p' standing for the decimal point), or NaN.
double radiusOfColumn(const std::string& name) {
    const std::string prefix = kRadiusPrefix;
    const std::string suffix = kRadiusSuffix;
    if (name.size() <= prefix.size() + suffix.size() || name.compare(0, prefix.size(), prefix) != 0 ||
        name.compare(name.size() - suffix.size(), suffix.size(), suffix) != 0) {
        return kNaN;
    }
    std::string label = name.substr(prefix.size(), name.size() - prefix.size() - suffix.size());
    std::replace(label.begin(), label.end(), 'p', '.');
    double radius = kNaN;
    const auto [end, error] = std::from_chars(label.data(), label.data() + label.size(), radius);
    return error == std::errc() && end == label.data() + label.size() ? radius : kNaN;
}

std::optional<std::string> readTextFile(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    if (!file) {
        return std::nullopt;
    }
    std::ostringstream text;
    text << file.rdbuf();
    return text.str();
}

std::optional<nlohmann::json> readJsonFile(const std::filesystem::path& path) {
    const auto text = readTextFile(path);
    if (!text) {
        return std::nullopt;
    }
    try {
        return nlohmann::json::parse(*text);
    } catch (const nlohmann::json::exception& error) {
        throw InputError(path.string() + ": not valid JSON (" + error.what() + ")");
    }
}

std::vector<std::string> splitCsvLine(const std::string& line) {
    std::vector<std::string> cells;
    std::istringstream stream(line);
    std::string cell;
    while (std::getline(stream, cell, ',')) {
        cells.push_back(cell);
    }
    if (!line.empty() && line.back() == ',') {
        cells.emplace_back();
    }
    return cells;
}

} // namespace

SampleColumns readSampleColumns(const std::filesystem::path& path) {
    if (!std::filesystem::is_regular_file(path)) {
        throw InputError(path.string() + ": no such file (run `starcensus run` into this directory first)");
    }
    const SampleFile file(path);
    SampleColumns sample;
    sample.ra_deg = file.numbers("ra");
    sample.dec_deg = file.numbers("dec");
    sample.parallax_mas = file.numbers("parallax");
    sample.abs_g_mag = file.numbers("abs_g");
    sample.bp_rp_mag = file.numbers("bp_rp");
    sample.class_name = file.strings("class");
    std::vector<std::pair<double, std::string>> radius_columns;
    for (const auto& name : file.columnNames()) {
        if (const double radius = radiusOfColumn(name); std::isfinite(radius)) {
            radius_columns.emplace_back(radius, name);
        }
    }
    if (radius_columns.empty()) {
        throw InputError(path.string() + ": no p_within_<R>pc column");
    }
    std::sort(radius_columns.begin(), radius_columns.end());
    for (const auto& [radius, name] : radius_columns) {
        sample.radii_pc.push_back(radius);
        sample.p_within.push_back(file.numbers(name));
    }
    return sample;
}

std::vector<LuminosityFunctionBin> parseLuminosityFunctionCsv(const std::string& text,
                                                              const std::string& where) {
    static const std::vector<std::string> kColumns = {
        "population",          "abs_g_lo", "abs_g_hi", "n_weighted",
        "phi_per_pc3_per_mag", "phi_lo68", "phi_hi68", "model_phi_per_pc3_per_mag"};
    std::istringstream lines(text);
    std::string line;
    if (!std::getline(lines, line)) {
        throw InputError(where + ": empty file");
    }
    const auto header = splitCsvLine(line);
    std::vector<std::size_t> index;
    for (const auto& name : kColumns) {
        const auto found = std::find(header.begin(), header.end(), name);
        if (found == header.end()) {
            throw InputError(where + ": no column " + name);
        }
        index.push_back(static_cast<std::size_t>(found - header.begin()));
    }
    std::vector<LuminosityFunctionBin> bins;
    for (std::size_t line_number = 2; std::getline(lines, line); ++line_number) {
        if (!line.empty() && line.back() == '\r') {
            line.pop_back();
        }
        if (line.empty()) {
            continue;
        }
        const auto cells = splitCsvLine(line);
        if (cells.size() != header.size()) {
            throw InputError(where + ": line " + std::to_string(line_number) + " has " +
                             std::to_string(cells.size()) + " cells, the header " +
                             std::to_string(header.size()));
        }
        const auto number = [&](std::size_t column) {
            const std::string& cell = cells[index[column]];
            if (cell.empty()) {
                return kNaN;
            }
            double value = kNaN;
            const auto [end, error] = std::from_chars(cell.data(), cell.data() + cell.size(), value);
            if (error != std::errc() || end != cell.data() + cell.size()) {
                throw InputError(where + ": line " + std::to_string(line_number) + ", column " +
                                 kColumns[column] + ": not a number: " + cell);
            }
            return value;
        };
        bins.push_back(
            {cells[index[0]], number(1), number(2), number(3), number(4), number(5), number(6), number(7)});
    }
    return bins;
}

ReportInputs readReportInputs(const std::filesystem::path& directory) {
    ReportInputs inputs;
    inputs.directory = directory;
    inputs.sample = readSampleColumns(directory / "sample.fits");
    const auto fractions = readJsonFile(directory / "fractions.json");
    if (!fractions) {
        throw InputError((directory / "fractions.json").string() + ": no such file");
    }
    if (fractions->value("schema", "") != "starcensus.fractions/1" || !fractions->contains("radii")) {
        throw InputError((directory / "fractions.json").string() + ": not a starcensus.fractions/1 document");
    }
    inputs.fractions = *fractions;
    const auto lumfunc_path = directory / "lumfunc.csv";
    if (const auto text = readTextFile(lumfunc_path)) {
        inputs.luminosity_function = parseLuminosityFunctionCsv(*text, lumfunc_path.string());
    } else {
        inputs.notes.push_back("lumfunc.csv is absent: no luminosity function is shown.");
    }
    inputs.luminosity_function_fit = readJsonFile(directory / "lumfunc_fit.json");
    if (!inputs.luminosity_function_fit) {
        inputs.notes.push_back("lumfunc_fit.json is absent: no fitted luminosity-function model parameters.");
    }
    inputs.completeness = readJsonFile(directory / "completeness.json");
    if (!inputs.completeness) {
        inputs.notes.push_back("completeness.json is absent: the completeness limit drawn is the default "
                               "faint limit G = 20.7 at the largest radius.");
    }
    inputs.provenance = readJsonFile(directory / "provenance.json");
    if (!inputs.provenance) {
        inputs.notes.push_back(
            "provenance.json is absent: the provenance shown is the one in fractions.json.");
    }
    return inputs;
}

} // namespace starcensus::reports
