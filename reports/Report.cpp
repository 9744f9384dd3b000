#include "reports/Report.h"

#include "photometry/StellarClass.h"
#include "photometry/base/AtomicOutput.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <iomanip>
#include <ostream>
#include <sstream>

namespace starcensus::reports {

namespace {

std::string readBinaryFile(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    std::ostringstream bytes;
    bytes << file.rdbuf();
    return bytes.str();
}

/// The figure as a data URI: its SVG, or its PNG where the SVG is large (many vector elements: a browser
/// opens a few-MB SVG slowly, and the HTML grows by 4/3 of it through base64), so report.html stays small
/// whatever the figure holds.
std::string figureDataUri(const FigureOutput& figure) {
    constexpr std::uintmax_t kMaxInlineSvgBytes = 1 << 20;
    if (std::filesystem::file_size(figure.svg) <= kMaxInlineSvgBytes) {
        return "data:image/svg+xml;base64," + base64Encode(readBinaryFile(figure.svg));
    }
    return "data:image/png;base64," + base64Encode(readBinaryFile(figure.png));
}

std::string number(double value, int significant = 3) {
    if (!std::isfinite(value)) {
        return "–";
    }
    std::ostringstream text;
    if (std::abs(value) >= std::pow(10.0, significant)) {
        text << std::fixed << std::setprecision(0) << value; // 1599, not 1.6e+03
    } else {
        text << std::setprecision(significant) << value;
    }
    return text.str();
}

/// "median [lo68, hi68]" (and " (95%: lo, hi)" when asked) of an interval object of fractions.json.
std::string intervalText(const nlohmann::json& interval, bool with_95, int significant = 3) {
    std::string text = number(interval.value("median", NAN), significant) + " [" +
                       number(interval.value("lo68", NAN), significant) + ", " +
                       number(interval.value("hi68", NAN), significant) + "]";
    if (with_95) {
        text += " (" + number(interval.value("lo95", NAN), significant) + ", " +
                number(interval.value("hi95", NAN), significant) + ")";
    }
    return text;
}

std::string jsonCell(const nlohmann::json& value) {
    if (value.is_null()) {
        return "–"; // as number() writes a value that is not finite
    }
    if (value.is_string()) {
        return escapeHtml(value.get<std::string>());
    }
    if (value.is_number_float()) {
        return number(value.get<double>(), 6);
    }
    if (value.is_primitive()) {
        return escapeHtml(value.dump());
    }
    if (value.is_array() &&
        std::all_of(value.begin(), value.end(), [](const auto& v) { return v.is_number() || v.is_null(); })) {
        std::string text; // a range such as complete_abs_g_range, to 4 significant digits
        for (const auto& v : value) {
            text += (text.empty() ? "[" : ", ") + (v.is_null() ? "–" : number(v.get<double>(), 4));
        }
        return text.empty() ? "[]" : text + "]";
    }
    return "<code>" + escapeHtml(value.dump()) + "</code>";
}

/// A fit's goodness of fit (lumfunc_fit.json) as a sentence: the Cash statistic, its degrees of
/// freedom and chi-square p-value, and the bins it used; other shapes as JSON.
std::string goodnessOfFitCell(const nlohmann::json& goodness) {
    if (!goodness.is_object() || !goodness.contains("cash_statistic") || !goodness.contains("p_value")) {
        return jsonCell(goodness);
    }
    const auto cell = [&](const char* key) { return jsonCell(goodness.value(key, nlohmann::json())); };
    std::string text = "C = " + cell("cash_statistic") + ", " + cell("degrees_of_freedom") +
                       " degrees of freedom, p = " + cell("p_value");
    if (goodness.contains("bins")) {
        text += " (" + cell("bins") + " bins, M_G " + cell("fit_abs_g_range") + ")";
    }
    return text;
}

class HtmlTable {
  public:
    explicit HtmlTable(std::vector<std::string> header) : header_(std::move(header)) {}
    void row(std::vector<std::string> cells) { rows_.push_back(std::move(cells)); } // cells are HTML
    std::string html() const {
        std::ostringstream out;
        out << "<table><thead><tr>";
        for (const auto& cell : header_) {
            out << "<th>" << escapeHtml(cell) << "</th>";
        }
        out << "</tr></thead><tbody>\n";
        for (const auto& cells : rows_) {
            out << "<tr>";
            for (const auto& cell : cells) {
                out << "<td>" << cell << "</td>";
            }
            out << "</tr>\n";
        }
        out << "</tbody></table>\n";
        return out.str();
    }

  private:
    std::vector<std::string> header_;
    std::vector<std::vector<std::string>> rows_;
};

std::string keyValueTable(const nlohmann::json& object) {
    HtmlTable table({"key", "value"});
    for (const auto& [key, value] : object.items()) {
        table.row({"<code>" + escapeHtml(key) + "</code>", jsonCell(value)});
    }
    return table.html();
}

constexpr const char* kStyle = R"(
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; margin: 2em auto; max-width: 1200px;
       color: #111; line-height: 1.4; padding: 0 1em; }
h1 { font-size: 1.6em; } h2 { font-size: 1.3em; border-bottom: 1px solid #ccc; margin-top: 2em; }
figure { margin: 1.5em 0; padding: 0.5em; border: 1px solid #ddd; }
figure img { display: block; width: 100%; max-width: 1000px; height: auto; margin: 0 auto; }
figcaption { font-size: 0.9em; margin-top: 0.5em; }
table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.88em; }
th, td { border: 1px solid #ccc; padding: 0.2em 0.5em; text-align: left; vertical-align: top; }
th { background: #f2f2f2; }
td code { white-space: pre-wrap; word-break: break-all; }
.note { background: #fff8e0; border-left: 4px solid #E69F00; padding: 0.3em 0.8em; margin: 0.3em 0; }
.verdict-pass { color: #009E73; font-weight: bold; } .verdict-fail { color: #D55E00; font-weight: bold; }
)";

std::string fractionTables(const nlohmann::json& fractions) {
    std::ostringstream out;
    for (const auto& radius : fractions.at("radii")) {
        out << "<h3>Within " << number(radius.value("radius_pc", NAN)) << " pc</h3>\n<p>Volume "
            << number(radius.value("volume_pc3", NAN), 5) << " pc³; expected members (sum of membership "
            << "probabilities) " << number(radius.value("n_expected", NAN), 5) << "; hard parallax cut "
            << number(radius.value("n_hard_cut", NAN), 5) << "; members over the draws "
            << intervalText(radius.value("members", nlohmann::json::object()), true, 5) << ".</p>\n";
        if (radius.contains("unclassified_by_reason")) {
            out << "<p>Unclassified members by reason (this volume):";
            const char* separator = " ";
            for (const auto& [reason, interval] : radius.at("unclassified_by_reason").items()) {
                out << separator << escapeHtml(reason) << " " << intervalText(interval, false, 4);
                separator = "; ";
            }
            out << ". The share among the classified leaves them out.</p>\n";
        }
        HtmlTable table({"class or group", "fraction, this volume [68%]", "fraction, population [68%] (95%)",
                         "share of the classified, population [68%]", "count, population [68%] (95%)",
                         "density, population (pc⁻³) [68%] (95%)"});
        const auto& classes = radius.at("classes");
        std::vector<std::string> names;
        for (const auto name : photometry::kClassNames) {
            if (classes.contains(std::string(name))) {
                names.emplace_back(name);
            }
        }
        for (const auto& [name, value] : classes.items()) {
            if (!photometry::classFromName(name)) {
                names.push_back(name);
            }
        }
        for (const auto& name : names) {
            const auto& entry = classes.at(name);
            table.row({escapeHtml(name), intervalText(entry.at("fraction").at("this_volume"), false),
                       intervalText(entry.at("fraction").at("population"), true),
                       entry.contains("fraction_of_classified")
                           ? intervalText(entry.at("fraction_of_classified").at("population"), false)
                           : "—",
                       intervalText(entry.at("count").at("population"), true),
                       intervalText(entry.at("density_pc3").at("population"), true)});
        }
        out << table.html();
    }
    return out.str();
}

/// The agreement of photometric classes with the literature types (fractions.json "spectral_type_check"):
/// a line per radius and the confusion table of the largest; "" when the run compared none.
std::string spectralTypeSection(const nlohmann::json& fractions) {
    const auto& radii = fractions.at("radii");
    if (radii.empty() || !radii.back().contains("spectral_type_check")) {
        return "";
    }
    std::ostringstream out;
    const auto& last = radii.back().at("spectral_type_check");
    out << "<p>Members (membership probability ≥ 0.5) with a catalogue spectral type, their photometric "
           "class "
           "against the class of the type (<code>--spectral-types "
        << escapeHtml(last.value("policy", "?")) << "</code>; under <code>use</code> the type sets the class "
        << "in the census).</p>\n";
    HtmlTable summary({"radius (pc)", "compared", "same class",
                       "same class among the photometrically classified", "median |subtype difference|"});
    for (const auto& radius : radii) {
        const auto& check = radius.at("spectral_type_check");
        summary.row({number(radius.value("radius_pc", NAN)), jsonCell(check.at("compared")),
                     jsonCell(check.at("agreeing")) + " (" + number(check.value("agreement", NAN)) + ")",
                     number(check.value("agreement_among_classified", NAN)),
                     number(check.value("median_abs_subtype_difference", NAN))});
    }
    out << summary.html();
    // Confusion table of the largest radius: literature classes as rows, photometric ones as columns,
    // only the classes that occur.
    std::vector<std::string> columns;
    for (const auto name : photometry::kClassNames) {
        for (const auto& [literature, row] : last.at("confusion").items()) {
            if (row.contains(std::string(name)) &&
                std::find(columns.begin(), columns.end(), name) == columns.end()) {
                columns.emplace_back(name);
            }
        }
    }
    std::vector<std::string> header = {"literature \\ photometric"};
    header.insert(header.end(), columns.begin(), columns.end());
    HtmlTable confusion(header);
    for (const auto name : photometry::kClassNames) {
        if (!last.at("confusion").contains(std::string(name))) {
            continue;
        }
        const auto& row = last.at("confusion").at(std::string(name));
        std::vector<std::string> cells = {escapeHtml(name)};
        for (const auto& column : columns) {
            cells.push_back(row.contains(column) ? jsonCell(row.at(column)) : "");
        }
        confusion.row(std::move(cells));
    }
    out << "<p>Within " << number(radii.back().value("radius_pc", NAN)) << " pc:</p>\n" << confusion.html();
    return out.str();
}

std::string uniformitySection(const ReportAnalysis& analysis) {
    const auto& test = analysis.uniformity;
    std::ostringstream out;
    if (test.objects == 0) {
        return "<p class=\"note\">No member has a position (RA/Dec): no sky map and no uniformity "
               "test.</p>\n";
    }
    HtmlTable table({"quantity", "value"});
    table.row({"stars mapped (p ≥ " + number(analysis.member_probability) + " at " +
                   number(analysis.largest_radius_pc) + " pc)",
               std::to_string(test.objects)});
    table.row(
        {"HEALPix nside (RING), pixels", std::to_string(test.nside) + ", " + std::to_string(test.pixels)});
    table.row({"mean stars per pixel", number(test.mean_per_pixel, 4)});
    table.row({"χ² (dispersion), degrees of freedom",
               number(test.chi_square, 5) + ", " + std::to_string(test.degrees_of_freedom)});
    table.row({"p-value of χ²", number(test.chi_square_p_value)});
    table.row({"smallest pixel count", std::to_string(test.min_count)});
    table.row(
        {"p-value of the deepest hole (Šidák-corrected for all pixels)", number(test.deepest_hole_p_value)});
    table.row({"empty pixels (expected under uniformity)",
               std::to_string(test.empty_pixels.size()) + " (" + number(test.expected_empty_pixels) + ")"});
    std::string empty_list;
    for (const int pixel : test.empty_pixels) {
        const auto centre = census::pixelCentre(test.nside, pixel);
        empty_list += (empty_list.empty() ? "" : "; ") + std::to_string(pixel) + " (l " +
                      number(centre.l_deg, 4) + "°, b " + number(centre.b_deg, 3) + "°)";
    }
    table.row({"empty pixels: index (centre)", empty_list.empty() ? "none" : escapeHtml(empty_list)});
    table.row({"verdict at family-wise significance " + number(test.significance),
               test.uniformity_rejected
                   ? "<span class=\"verdict-fail\">uniformity rejected: look for holes or "
                     "clusters</span>"
                   : "<span class=\"verdict-pass\">consistent with a uniform sky</span>"});
    out << table.html();
    return out.str();
}

std::string qualityCutsSection(const nlohmann::json& provenance) {
    if (!provenance.contains("quality_cuts")) {
        return "<p class=\"note\">fractions.json records no quality_cuts (written by an older "
               "starcensus).</p>\n";
    }
    std::ostringstream out;
    if (provenance.contains("candidates_before_cuts")) {
        out << "<p>" << jsonCell(provenance.at("candidates_before_cuts")) << " candidates before the cuts, "
            << jsonCell(provenance.value("candidates_after_cuts", nlohmann::json())) << " after.</p>\n";
    }
    HtmlTable table({"cut", "what it does", "rows affected"});
    for (const auto& cut : provenance.at("quality_cuts")) {
        table.row({"<code>" + escapeHtml(cut.value("name", "")) + "</code>",
                   escapeHtml(cut.value("description", "")),
                   jsonCell(cut.value("rows_affected", nlohmann::json()))});
    }
    out << table.html();
    return out.str();
}

/// The merge of overlapping inputs (fractions.json provenance "merges"): totals and one row per pair of
/// files with a merge.
std::string mergeSection(const nlohmann::json& provenance) {
    if (!provenance.contains("merges")) {
        return "<p class=\"note\">fractions.json records no merges (written by an older starcensus).</p>\n";
    }
    const auto& merges = provenance.at("merges");
    const auto count = [&](const char* key) { return jsonCell(merges.value(key, nlohmann::json())); };
    std::ostringstream out;
    out << "<p>" << count("rows_in") << " candidate rows, " << count("rows_out")
        << " objects after merging: " << count("by_source_id") << " rows repeated a source_id, "
        << count("by_position") << " matched by position (within "
        << jsonCell(provenance.value("match_radius_arcsec", nlohmann::json())) << " arcsec at J"
        << jsonCell(provenance.value("match_epoch_yr", nlohmann::json())) << "); "
        << count("pairs_refused_by_parallax")
        << " close pairs from different files kept apart by inconsistent parallaxes.</p>\n";
    HtmlTable table({"file A", "file B", "rows merged by source_id", "objects merged by position"});
    for (const auto& pair : merges.value("file_pairs", nlohmann::json::array())) {
        table.row({"<code>" + escapeHtml(pair.value("file_a", "")) + "</code>",
                   "<code>" + escapeHtml(pair.value("file_b", "")) + "</code>",
                   jsonCell(pair.value("by_source_id", nlohmann::json())),
                   jsonCell(pair.value("by_position", nlohmann::json()))});
    }
    out << table.html();
    return out.str();
}

std::string completenessSection(const nlohmann::json& completeness) {
    std::ostringstream out;
    out << "<p>Faint limit G = " << jsonCell(completeness.value("faint_limit_g", nlohmann::json())) << " ("
        << jsonCell(completeness.value("faint_limit_source", nlohmann::json("unstated")))
        << "), bright limit G = " << jsonCell(completeness.value("bright_limit_g", nlohmann::json()))
        << ".</p>\n";
    HtmlTable table({"radius (pc)", "complete M_G range", "class", "V/Vmax (expected 0.5 ± σ)",
                     "completeness radius (pc)", "complete"});
    for (const auto& radius : completeness.value("radii", nlohmann::json::array())) {
        const std::string range = jsonCell(radius.value("complete_abs_g_range", nlohmann::json()));
        const auto classes = radius.value("classes", nlohmann::json::object());
        for (const auto& [name, entry] : classes.items()) {
            table.row({jsonCell(radius.value("radius_pc", nlohmann::json())), range, escapeHtml(name),
                       jsonCell(entry.value("v_over_vmax", nlohmann::json())) + " (" +
                           jsonCell(entry.value("v_over_vmax_expected", nlohmann::json())) + " ± " +
                           jsonCell(entry.value("v_over_vmax_sigma", nlohmann::json())) + ")",
                       jsonCell(entry.value("completeness_radius_pc", nlohmann::json())),
                       jsonCell(entry.value("complete", nlohmann::json()))});
        }
    }
    out << table.html();
    return out.str();
}

std::string luminosityFitSection(const nlohmann::json& fit) {
    std::ostringstream out;
    HtmlTable table(
        {"model", "converged", "parameters ± errors", "log-likelihood", "goodness of fit", "message"});
    for (const auto& model : fit.value("fits", nlohmann::json::array())) {
        std::string parameters;
        const auto errors = model.value("errors", nlohmann::json::object());
        const auto values = model.value("parameters", nlohmann::json::object());
        for (const auto& [name, value] : values.items()) {
            parameters += (parameters.empty() ? "" : "<br>") + escapeHtml(name) + " = " + jsonCell(value) +
                          (errors.contains(name) ? " ± " + jsonCell(errors.at(name)) : std::string());
        }
        table.row({jsonCell(model.value("model", nlohmann::json())),
                   jsonCell(model.value("converged", nlohmann::json())), parameters,
                   jsonCell(model.value("log_likelihood", nlohmann::json())),
                   model.value("converged", false)
                       ? goodnessOfFitCell(model.value("goodness_of_fit", nlohmann::json()))
                       : "–",
                   jsonCell(model.value("message", nlohmann::json()))});
    }
    out << table.html();
    return out.str();
}

} // namespace

std::string base64Encode(std::string_view bytes) {
    static constexpr char kAlphabet[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    std::string encoded;
    encoded.reserve((bytes.size() + 2) / 3 * 4);
    for (std::size_t i = 0; i < bytes.size(); i += 3) {
        const std::size_t n = std::min<std::size_t>(3, bytes.size() - i);
        std::uint32_t group = 0;
        for (std::size_t k = 0; k < 3; ++k) {
            group = (group << 8) | (k < n ? static_cast<unsigned char>(bytes[i + k]) : 0U);
        }
        for (std::size_t k = 0; k < 4; ++k) {
            encoded.push_back(k <= n ? kAlphabet[(group >> (18 - 6 * k)) & 0x3F] : '=');
        }
    }
    return encoded;
}

std::string escapeHtml(std::string_view text) {
    std::string escaped;
    escaped.reserve(text.size());
    for (const char c : text) {
        switch (c) {
        case '&':
            escaped += "&amp;";
            break;
        case '<':
            escaped += "&lt;";
            break;
        case '>':
            escaped += "&gt;";
            break;
        case '"':
            escaped += "&quot;";
            break;
        default:
            escaped.push_back(c);
        }
    }
    return escaped;
}

std::string reportHtml(const ReportInputs& inputs, const ReportAnalysis& analysis,
                       const std::vector<FigureOutput>& figures) {
    const auto provenance = inputs.fractions.value("provenance", nlohmann::json::object());
    std::ostringstream html;
    html << "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         << "<title>starcensus report: " << escapeHtml(inputs.directory.string()) << "</title>\n<style>"
         << kStyle << "</style>\n</head>\n<body>\n<h1>starcensus census report</h1>\n"
         << "<p>Run directory <code>" << escapeHtml(inputs.directory.string()) << "</code>; "
         << inputs.sample.size() << " stars in sample.fits; census radii";
    for (const double radius : inputs.sample.radii_pc) {
        html << ' ' << number(radius);
    }
    html << " pc; starcensus " << jsonCell(provenance.value("version", nlohmann::json("?"))) << ", seed "
         << jsonCell(provenance.value("seed", nlohmann::json("?"))) << ", "
         << jsonCell(provenance.value("draws", nlohmann::json("?"))) << " Monte Carlo draws.</p>\n";
    for (const auto& note : inputs.notes) {
        html << "<p class=\"note\">" << escapeHtml(note) << "</p>\n";
    }
    html << "<h2>Figures</h2>\n<p>Each figure is also in <code>figures/</code> as SVG and PDF (for papers) "
            "and "
            "PNG. Colours: Okabe &amp; Ito (2008), \"Color Universal Design\", with a distinct marker per "
            "class.</p>\n";
    for (std::size_t i = 0; i < figures.size(); ++i) {
        const auto& figure = figures[i];
        html << "<figure id=\"fig-" << figure.id << "\" class=\"report-figure\">\n<img alt=\""
             << escapeHtml(figure.title) << "\" src=\"" << figureDataUri(figure)
             << "\">\n<figcaption><b>Figure " << i + 1 << ". " << escapeHtml(figure.title) << ".</b> "
             << escapeHtml(figure.caption) << " Files: <code>figures/" << figure.id
             << ".svg</code>, <code>.pdf</code>, <code>.png</code>.</figcaption>\n</figure>\n";
    }
    html << "<h2>Sky uniformity</h2>\n" << uniformitySection(analysis);
    html
        << "<h2>Fractions, counts and densities</h2>\n<p>Medians with 68% intervals in brackets and 95% in "
           "parentheses. <i>This volume</i>: the stars actually within the radius (measurement errors only); "
           "<i>population</i>: the underlying population the volume samples (adds Poisson variation).</p>\n"
        << fractionTables(inputs.fractions);
    if (const std::string types = spectralTypeSection(inputs.fractions); !types.empty()) {
        html << "<h2>Photometric classes and literature spectral types</h2>\n" << types;
    }
    if (inputs.luminosity_function_fit) {
        html << "<h2>Luminosity-function fits</h2>\n"
             << luminosityFitSection(*inputs.luminosity_function_fit);
    }
    if (inputs.completeness) {
        html << "<h2>Completeness</h2>\n" << completenessSection(*inputs.completeness);
    }
    html << "<h2>Inputs: merged rows</h2>\n" << mergeSection(provenance);
    html << "<h2>Quality cuts</h2>\n" << qualityCutsSection(provenance);
    html << "<h2>Provenance</h2>\n<h3>Run settings (fractions.json)</h3>\n";
    auto settings = provenance;
    settings.erase("quality_cuts");
    settings.erase("merges");
    html << keyValueTable(settings);
    if (inputs.provenance) {
        html << "<h3>provenance.json</h3>\n" << keyValueTable(*inputs.provenance);
    }
    html << "</body>\n</html>\n";
    return html.str();
}

ReportOutput writeCensusReport(const std::filesystem::path& directory, const ReportSettings& settings,
                               std::ostream* progress) {
    if (progress != nullptr) {
        *progress << "report: reading " << directory.string() << '\n' << std::flush;
    }
    const ReportInputs inputs = readReportInputs(directory);
    const ReportAnalysis analysis = analyseReport(inputs, settings);
    ReportOutput output;
    output.figures = drawReportFigures(inputs, analysis, directory / "figures", progress);
    output.html = directory / "report.html";
    writeTextFileAtomically(output.html, reportHtml(inputs, analysis, output.figures));
    output.notes = inputs.notes;
    output.uniformity = analysis.uniformity;
    return output;
}

} // namespace starcensus::reports
