#include "photometry/catalog/CatalogInspection.h"

#include "photometry/base/InputError.h"
#include "photometry/catalog/CsvCatalog.h"
#include "photometry/catalog/VoTableCatalog.h"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <utility>

namespace starcensus::photometry {

namespace {

// Profiles and maps one file, and scans it when every field resolves; throws InputError when the file
// cannot be read.
void inspectFile(CatalogInspection& inspection, const ScanSettings& settings) {
    const std::string& path = inspection.path;
    const bool csv = isCsvPath(path);
    const bool fits = !csv && !isVoTablePath(path); // the text formats have no HDUs
    if (fits) {
        inspection.hdus = listHdus(path);
    }
    inspection.table = profileTable(path, settings.hdu);
    if (fits) {
        inspection.hdu_option = std::to_string(inspection.table.hdu_index);
    }
    inspection.mapping = attemptColumns(descriptionsOf(inspection.table),
                                        MappingRequest{settings.user_columns, settings.user_units, csv},
                                        inspection.table.where);
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        if (!inspection.mapping.mapping.fields[i]) {
            inspection.candidates[i] = rankCandidates(static_cast<CatalogField>(i), inspection.table.columns);
        }
    }
    const auto& problems = inspection.mapping.problems;
    if (!std::all_of(problems.begin(), problems.end(), [](const std::string& p) { return p.empty(); })) {
        return;
    }
    ScanSettings counting = settings;
    counting.keep_candidates = false;
    counting.null_counts_over_all_rows = true;
    try {
        inspection.scan = std::move(scanCatalogs({path}, counting).files.front());
        inspection.scanned = true;
    } catch (const InputError& refused) {
        inspection.scan_error = refused.what(); // the table was read; a run would stop here
    }
}

} // namespace

std::vector<CatalogInspection> inspectCatalogs(const std::vector<std::string>& paths,
                                               const ScanSettings& settings) {
    std::vector<CatalogInspection> inspections;
    for (const auto& path : paths) {
        CatalogInspection inspection;
        inspection.path = path;
        inspection.user_units = settings.user_units;
        try {
            inspectFile(inspection, settings);
        } catch (const InputError& error) {
            inspection.error = error.what();
        }
        inspections.push_back(std::move(inspection));
    }
    return inspections;
}

namespace {

// Rows of cells printed in columns as wide as their widest cell, two blanks apart; the last cell of a
// row is not padded.
class AlignedText {
  public:
    void add(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
    void write(std::ostringstream& out, const std::string& indent) const {
        std::vector<std::size_t> widths;
        for (const auto& row : rows_) {
            widths.resize(std::max(widths.size(), row.size()), 0);
            for (std::size_t i = 0; i < row.size(); ++i) {
                widths[i] = std::max(widths[i], row[i].size());
            }
        }
        for (const auto& row : rows_) {
            std::string line = indent;
            for (std::size_t i = 0; i < row.size(); ++i) {
                line += row[i];
                if (i + 1 < row.size()) {
                    line.append(widths[i] - row[i].size() + 2, ' ');
                }
            }
            out << line << "\n";
        }
    }

  private:
    std::vector<std::vector<std::string>> rows_;
};

// Shortest round-trip-free form for people: 6 significant digits, no trailing zeros ("10", "0.25").
std::string number(double value) {
    std::ostringstream text;
    text << value;
    return text.str();
}

std::string orDash(const std::string& text) {
    return text.empty() ? "-" : text;
}

std::string quotedList(const std::vector<std::string>& texts) {
    std::string list;
    for (const auto& text : texts) {
        list.append(list.empty() ? "" : ", ").append("'").append(text).append("'");
    }
    return list;
}

std::string valuesOf(const ColumnProfile& column) {
    if (column.kind == ColumnKind::Other) {
        return "not read (vector, logical or bit column)";
    }
    if (column.numbers == 0 && column.texts == 0) {
        return "all null";
    }
    std::string values;
    if (column.numbers > 0) {
        values = number(column.min) + " to " + number(column.max);
    }
    if (column.texts > 0) {
        values.append(values.empty() ? "" : "; ")
            .append(column.kind == ColumnKind::Mixed ? std::to_string(column.texts) + " not numbers: " : "")
            .append(quotedList(column.samples));
    }
    return values;
}

void formatHdus(std::ostringstream& out, const std::vector<HduSummary>& hdus) {
    out << "  HDUs:\n";
    AlignedText table;
    for (const auto& hdu : hdus) {
        table.add({std::to_string(hdu.index), hdu.type, hdu.name.empty() ? "-" : hdu.name,
                   hdu.type == "image"
                       ? (hdu.image_shape == "none" ? "no data" : "data " + hdu.image_shape)
                       : std::to_string(hdu.rows) + " rows, " + std::to_string(hdu.columns) + " columns"});
    }
    table.write(out, "    ");
}

void formatColumns(std::ostringstream& out, const TableProfile& table) {
    out << "  columns:\n";
    AlignedText text;
    text.add({"#", "name", "kind", "TFORM", "unit", "UCD", "nulls", "values"});
    for (const auto& column : table.columns) {
        const ColumnDescription& description = column.description;
        text.add({std::to_string(description.number), description.name, std::string(kindName(column.kind)),
                  orDash(description.tform), orDash(description.unit), orDash(description.ucd),
                  column.kind == ColumnKind::Other ? "-" : std::to_string(column.nulls), valuesOf(column)});
    }
    text.write(out, "    ");
}

std::string unitText(const ResolvedColumn& resolved) {
    if (resolved.flux_over_error) {
        return "flux/error -> mag error";
    }
    return (resolved.unit.empty() ? "-" : resolved.unit) + " (" + resolved.unit_source + ")";
}

void formatFields(std::ostringstream& out, const CatalogInspection& inspection) {
    out << "  fields:\n";
    AlignedText text;
    text.add({"field", "column", "route", "unit (from)", "nulls", "why"});
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const std::string field(kCatalogFieldNames[i]);
        const auto& resolved = inspection.mapping.mapping.fields[i];
        if (resolved) {
            const ColumnProfile& column = inspection.table.columns[resolved->column_index];
            const auto nulls = inspection.scanned ? inspection.scan.null_counts[i] : column.nulls;
            std::string why = resolved->matched_by;
            if (!isTextField(resolved->field) && column.texts > 0) {
                why += "; " + std::to_string(column.texts) + " cells not numbers ('" +
                       column.samples.front() + "'): a run refuses them (--column " + field +
                       "=none leaves the field unmapped)";
            }
            text.add({field, resolved->column_name, std::string(routeName(resolved->route)),
                      unitText(*resolved), std::to_string(nulls), why});
            continue;
        }
        const std::string& problem = inspection.mapping.problems[i];
        const auto& candidates = inspection.candidates[i];
        std::string why = candidates.empty() ? "no candidate" : "candidates below";
        if (isRequiredField(static_cast<CatalogField>(i))) {
            why = "required; " + why;
        }
        const std::string where = inspection.table.where + ": ";
        if (!problem.empty() && problem.find(": no column for ") == std::string::npos) {
            // Ambiguous, a --column naming no column, or a unit the field refuses; the file is named above.
            why = problem.starts_with(where) ? problem.substr(where.size()) : problem;
        }
        text.add({field, "none", "-", "-", "-", why});
        for (std::size_t c = 0; c < candidates.size(); ++c) {
            const ColumnProfile& column = inspection.table.columns[candidates[c].column_index];
            text.add({"", "  " + std::to_string(c + 1) + ". " + column.description.name, "", "", "",
                      "score " + std::to_string(candidates[c].score) + ": " + candidates[c].reasons});
        }
    }
    text.write(out, "    ");
}

// A column name or path as one shell word: quoted when it holds anything but letters, digits and
// _ . + - = /.
std::string shellWord(const std::string& text) {
    const bool plain = std::all_of(text.begin(), text.end(), [](unsigned char c) {
        return std::isalnum(c) || c == '_' || c == '.' || c == '+' || c == '-' || c == '=' || c == '/';
    });
    if (plain) {
        return text;
    }
    std::string quoted = "'";
    for (const char c : text) {
        quoted += c == '\'' ? std::string("'\\''") : std::string(1, c); // ' ends, escapes and reopens
    }
    return quoted + "'";
}

using OptionList = std::vector<std::pair<std::string, std::string>>; // option name, value

OptionList settledOptions(const CatalogInspection& inspection) {
    OptionList options;
    if (!inspection.hdu_option.empty()) {
        options.emplace_back("hdu", inspection.hdu_option);
    }
    for (const auto& resolved : inspection.mapping.mapping.fields) {
        if (resolved) {
            options.emplace_back("column",
                                 std::string(fieldName(resolved->field)) + "=" + resolved->column_name);
        }
    }
    for (const auto& resolved : inspection.mapping.mapping.fields) {
        if (resolved && resolved->unit_source == "--unit") {
            options.emplace_back("unit", std::string(fieldName(resolved->field)) + "=" + resolved->unit);
        }
    }
    return options;
}

// The best candidate of every unmapped field, with the unit a column without TUNITn needs.
OptionList suggestedOptions(const CatalogInspection& inspection) {
    OptionList options;
    OptionList units;
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const auto field = static_cast<CatalogField>(i);
        if (inspection.mapping.mapping.fields[i] || inspection.candidates[i].empty()) {
            continue;
        }
        const ColumnCandidate& best = inspection.candidates[i].front();
        const ColumnDescription& column = inspection.table.columns[best.column_index].description;
        const std::string name(fieldName(field));
        options.emplace_back("column", name + "=" + column.name);
        if (column.unit.empty() && !unitScale(field, "") && inspection.user_units.count(name) == 0) {
            units.emplace_back("unit", name + "=" + (best.name_unit.empty() ? "UNIT" : best.name_unit));
        }
    }
    options.insert(options.end(), units.begin(), units.end());
    return options;
}

std::string asCommandLine(const OptionList& options) {
    std::string line;
    for (const auto& [option, value] : options) {
        line.append(line.empty() ? "" : " ").append("--" + option + " " + shellWord(value));
    }
    return line;
}

std::string asIni(const OptionList& options, const std::string& prefix) {
    std::string lines;
    for (const auto& [option, value] : options) {
        lines.append(prefix + option + " = " + value + "\n");
    }
    return lines;
}

void formatMappingText(std::ostringstream& out, const CatalogInspection& inspection) {
    const OptionList settled = settledOptions(inspection);
    out << "  mapping as a command line:\n    starcensus run " << shellWord(inspection.path) << " "
        << asCommandLine(settled) << "\n";
    out << "  mapping as INI lines (--config FILE):\n" << asIni(settled, "    ");
    const OptionList suggested = suggestedOptions(inspection);
    if (!suggested.empty()) {
        out << "  suggested, not applied (best candidate of each unmapped field; check before use):\n    "
            << asCommandLine(suggested) << "\n"
            << asIni(suggested, "    # ");
        if (std::any_of(suggested.begin(), suggested.end(),
                        [](const auto& option) { return option.second.ends_with("=UNIT"); })) {
            out << "    (UNIT: the unit the column is in; parallaxes accept mas, arcsec or uas)\n";
        }
    }
}

// What a run makes from a group of fields, and what it does without them (README.md, Methods).
struct Capability {
    std::vector<CatalogField> needs;
    std::string_view name;
    std::string_view with;
    std::string_view without;
};

const std::vector<Capability>& capabilities() {
    using F = CatalogField;
    static const std::vector<Capability> list = {
        {{F::Parallax, F::ParallaxError},
         "census",
         "memberships, classes from the bands present, fractions",
         "none: a run stops"},
        {{F::G},
         "Gaia G",
         "M_G classes, the luminosity function and completeness",
         "classes from the other bands only; no luminosity function"},
        {{F::Bp, F::Rp},
         "BP-RP",
         "classes on the main-sequence locus, white dwarfs with Teff and mass",
         "classes from M_G alone (flagged lower confidence)"},
        {{F::BpError, F::RpError},
         "BP-RP errors",
         "the 0.1 mag colour cut; colours drawn from their errors",
         "colours kept whatever their errors, drawn without scatter"},
        {{F::GError}, "G errors", "G drawn from its error in the Monte Carlo", "G taken as exact"},
        {{F::J, F::Ks},
         "near infrared",
         "L/T/Y dwarfs from M_J and J-Ks",
         "L/T/Y dwarfs from Gaia bands only (T dwarfs by G-RP)"},
        {{F::JError, F::KsError},
         "J/Ks errors",
         "Teff and mass errors of near-infrared hosts",
         "near-infrared hosts get teff_error and mass_error 0"},
        {{F::W1, F::W2},
         "mid infrared",
         "W1-W2 classes for objects without J-Ks",
         "objects without J-Ks get no W1-W2 class"},
        {{F::Ruwe},
         "RUWE",
         "parallax errors inflated above RUWE 1.4 (--max-ruwe removes instead)",
         "parallax errors used as given"},
        {{F::Ra, F::Dec},
         "positions",
         "sky map and sky-uniformity test in report.html",
         "no sky map, no sky-uniformity test"},
        {{F::SourceId}, "source_id", "identifiers in sample.fits and hosts.fits", "sample.fits lists -1"},
        {{F::Pmra, F::Pmdec},
         "proper motions",
         "positions moved to a common epoch when catalogues are merged",
         "rows matched across catalogues at their catalogue positions"},
        {{F::SpectralType},
         "spectral types",
         "literature classes used (--spectral-types) and compared with the photometric ones",
         "photometric classes only"},
        {{F::V, F::Ks},
         "Johnson V",
         "V-Ks classes for objects without BP-RP (bright stars)",
         "objects without BP-RP get no V-Ks class"},
    };
    return list;
}

void formatCapabilities(std::ostringstream& out, const CatalogInspection& inspection) {
    out << "  a run with this mapping:\n";
    const ColumnMapping& mapping = inspection.mapping.mapping;
    AlignedText text;
    for (const auto& capability : capabilities()) {
        std::string missing;
        for (const auto field : capability.needs) {
            if (!mapping[field]) {
                missing.append(missing.empty() ? "" : " ").append(fieldName(field));
            }
        }
        text.add({missing.empty() ? "[x]" : "[ ]", std::string(capability.name) + ":",
                  missing.empty() ? std::string(capability.with)
                                  : std::string(capability.without) + " (missing " + missing + ")"});
    }
    text.write(out, "    ");
    std::string required;
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        if (isRequiredField(static_cast<CatalogField>(i)) && !mapping.fields[i]) {
            required.append(required.empty() ? "" : " ").append(kCatalogFieldNames[i]);
        }
    }
    if (!required.empty()) {
        out << "  required fields not mapped yet: " << required << "\n";
    }
    const auto& problems = inspection.mapping.problems;
    const auto first =
        std::find_if(problems.begin(), problems.end(), [](const std::string& p) { return !p.empty(); });
    if (first != problems.end()) {
        out << "  a run stops with: " << *first << "\n";
    } else if (!inspection.scan_error.empty()) {
        out << "  a run stops with: " << inspection.scan_error << "\n";
    }
}

void formatScan(std::ostringstream& out, const FileScanReport& scan) {
    if (std::isnan(scan.parallax_min_mas)) {
        out << "  parallax range: no parallaxes\n";
    } else {
        out << "  parallax range: " << number(scan.parallax_min_mas) << " to "
            << number(scan.parallax_max_mas) << " mas\n";
    }
    const ScanCounts& counts = scan.counts;
    out << "  rows: " << counts.rows_read << " read, " << counts.rows_no_parallax << " without parallax, "
        << counts.rows_unusable_parallax_error << " with unusable parallax error, "
        << counts.rows_nonpositive_parallax << " with parallax <= 0, " << counts.candidates
        << " candidates\n";
    for (const auto& warning : scan.warnings) {
        out << "  warning: " << warning << "\n";
    }
}

} // namespace

std::string mappingAsOptions(const CatalogInspection& inspection) {
    return asCommandLine(settledOptions(inspection));
}

std::string mappingAsIni(const CatalogInspection& inspection) {
    return asIni(settledOptions(inspection), "");
}

std::string formatInspection(const std::vector<CatalogInspection>& inspections) {
    std::ostringstream out;
    for (const auto& inspection : inspections) {
        out << inspection.path << "\n";
        if (!inspection.hdus.empty()) {
            formatHdus(out, inspection.hdus);
        }
        if (!inspection.error.empty()) {
            out << "  error: " << inspection.error << "\n\n";
            continue;
        }
        const TableProfile& table = inspection.table;
        out << "  table: " << (table.hdu_name == "CSV" ? "CSV" : "HDU " + std::to_string(table.hdu_index))
            << (table.hdu_name.empty() || table.hdu_name == "CSV" ? "" : " " + table.hdu_name) << ", "
            << table.rows << " rows, " << table.columns.size() << " columns\n";
        formatColumns(out, table);
        formatFields(out, inspection);
        formatMappingText(out, inspection);
        formatCapabilities(out, inspection);
        if (inspection.scanned) {
            formatScan(out, inspection.scan);
        }
        out << "\n";
    }
    return out.str();
}

} // namespace starcensus::photometry
