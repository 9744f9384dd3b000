#include "photometry/catalog/ColumnMapping.h"

#include "photometry/base/InputError.h"

#include <algorithm>
#include <cctype>
#include <numbers>

namespace starcensus::photometry {

namespace {

std::string lowercase(std::string_view text) {
    std::string result(text);
    std::transform(result.begin(), result.end(), result.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    return result;
}

std::string trimmed(std::string_view text) {
    const auto first = text.find_first_not_of(" \t");
    if (first == std::string_view::npos) {
        return {};
    }
    const auto last = text.find_last_not_of(" \t");
    return std::string(text.substr(first, last - first + 1));
}

// Units are compared without case, blanks and the VOUnit product/power marks, so "mas.yr**-1",
// "mas yr-1" and "mas/yr" all read the same.
std::string normalisedUnit(std::string_view unit) {
    std::string result;
    for (const char c : lowercase(unit)) {
        if (c != ' ' && c != '.' && c != '*' && c != '^') {
            result += c;
        }
    }
    return result;
}

struct UnitChoice {
    std::string_view spelling; // normalised
    double scale;
};

// Parallaxes: no default unit (a wrong guess is a factor of 1000 in distance).
constexpr std::array<UnitChoice, 9> kAngleSmallUnits = {{{"mas", 1.0},
                                                         {"milliarcsec", 1.0},
                                                         {"marcsec", 1.0},
                                                         {"arcsec", 1000.0},
                                                         {"arcsecond", 1000.0},
                                                         {"uas", 1e-3},
                                                         {"\xC2\xB5"
                                                          "as",
                                                          1e-3},
                                                         {"microarcsec", 1e-3},
                                                         {"\xCE\xBC"
                                                          "as",
                                                          1e-3}}};
constexpr std::array<UnitChoice, 6> kPositionUnits = {{{"", 1.0},
                                                       {"deg", 1.0},
                                                       {"degree", 1.0},
                                                       {"degrees", 1.0},
                                                       {"rad", 180.0 / std::numbers::pi},
                                                       {"radian", 180.0 / std::numbers::pi}}};
constexpr std::array<UnitChoice, 11> kProperMotionUnits = {{{"", 1.0},
                                                            {"mas/yr", 1.0},
                                                            {"masyr-1", 1.0},
                                                            {"mas/a", 1.0},
                                                            {"masa-1", 1.0},
                                                            {"mas/year", 1.0},
                                                            {"arcsec/yr", 1000.0},
                                                            {"arcsecyr-1", 1000.0},
                                                            {"arcsec/a", 1000.0},
                                                            {"arcseca-1", 1000.0},
                                                            {"arcsec/year", 1000.0}}};
constexpr std::array<UnitChoice, 2> kMagnitudeUnits = {{{"", 1.0}, {"mag", 1.0}}};
constexpr std::array<UnitChoice, 1> kDimensionlessUnits = {{{"", 1.0}}};

std::span<const UnitChoice> unitChoices(CatalogField field) {
    switch (field) {
    case CatalogField::SourceId:
    case CatalogField::Ruwe:
    case CatalogField::Components:
    case CatalogField::SpectralType:
        return kDimensionlessUnits;
    case CatalogField::Ra:
    case CatalogField::Dec:
        return kPositionUnits;
    case CatalogField::Parallax:
    case CatalogField::ParallaxError:
        return kAngleSmallUnits;
    case CatalogField::Pmra:
    case CatalogField::Pmdec:
        return kProperMotionUnits;
    default:
        return kMagnitudeUnits;
    }
}

// UCD1+ words a column may carry for each field (see the header for the vocabulary). Gaia DR3 labels
// G, BP and RP as em.opt, em.opt.B and em.opt.R (Gaia DR3 documentation, gaia_source datamodel); 2MASS
// J, H, Ks are em.IR.J, em.IR.H, em.IR.K; WISE W1 and W2 are em.IR.3-4um and em.IR.4-8um (the AllWISE
// and CatWISE renderings in VizieR; from memory), Johnson V em.opt.V. Johnson B is found by name only: its
// UCD, em.opt.B, is also Gaia BP's. "meta.main" is ignored except where it picks the main position
// or identifier out of several.
struct FieldRule {
    std::vector<std::string_view> ucds;
    std::vector<std::string_view> names;
};

const FieldRule& fieldRule(CatalogField field) {
    static const std::array<FieldRule, kCatalogFieldCount> rules = {{
        {{"meta.id;meta.main"}, {"source_id", "sourceid", "source"}},
        {{"pos.eq.ra;meta.main"}, {"ra", "ra_deg", "radeg", "ra_icrs", "raj2000"}},
        {{"pos.eq.dec;meta.main"}, {"dec", "dec_deg", "decdeg", "de_icrs", "dej2000", "dedeg"}},
        {{"pos.parallax", "pos.parallax.trig"}, {"parallax", "plx"}},
        {{"stat.error;pos.parallax", "stat.error;pos.parallax.trig"},
         {"parallax_error", "e_plx", "plx_error", "parallax_err", "e_parallax"}},
        {{"pos.pm;pos.eq.ra"}, {"pmra"}},
        {{"pos.pm;pos.eq.dec"}, {"pmdec", "pmde"}},
        {{"phot.mag;em.opt"}, {"phot_g_mean_mag", "gmag", "g_mag"}},
        {{"phot.mag;em.opt.b"}, {"phot_bp_mean_mag", "bpmag", "bp_mag"}},
        {{"phot.mag;em.opt.r"}, {"phot_rp_mean_mag", "rpmag", "rp_mag"}},
        {{"stat.error;phot.mag;em.opt", "stat.snr;phot.flux;em.opt", "stat.snr;phot.mag;em.opt"},
         {"phot_g_mean_mag_error", "e_gmag", "gmag_error", "g_mag_error", "phot_g_mean_flux_over_error"}},
        {{"stat.error;phot.mag;em.opt.b", "stat.snr;phot.flux;em.opt.b", "stat.snr;phot.mag;em.opt.b"},
         {"phot_bp_mean_mag_error", "e_bpmag", "bpmag_error", "bp_mag_error",
          "phot_bp_mean_flux_over_error"}},
        {{"stat.error;phot.mag;em.opt.r", "stat.snr;phot.flux;em.opt.r", "stat.snr;phot.mag;em.opt.r"},
         {"phot_rp_mean_mag_error", "e_rpmag", "rpmag_error", "rp_mag_error",
          "phot_rp_mean_flux_over_error"}},
        {{"phot.mag;em.ir.j"}, {"j_m", "jmag", "j_mag"}},
        {{"phot.mag;em.ir.h"}, {"h_m", "hmag", "h_mag"}},
        {{"phot.mag;em.ir.k"}, {"ks_m", "k_m", "ksmag", "kmag", "ks_mag"}},
        {{}, {"ruwe"}},
        // 2MASS PSC: j_msigcom (total uncertainty) or j_cmsig (corrected photometric); VizieR's e_Jmag.
        {{"stat.error;phot.mag;em.ir.j"}, {"j_msigcom", "e_jmag", "j_cmsig", "j_mag_error", "jmag_error"}},
        {{"stat.error;phot.mag;em.ir.h"}, {"h_msigcom", "e_hmag", "h_cmsig", "h_mag_error", "hmag_error"}},
        {{"stat.error;phot.mag;em.ir.k"},
         {"ks_msigcom", "k_msigcom", "e_kmag", "e_ksmag", "k_cmsig", "ks_cmsig", "ks_mag_error",
          "kmag_error"}},
        {{}, {"bmag", "b_mag", "bjmag"}},
        {{"phot.mag;em.opt.v"}, {"vmag", "v_mag", "vjmag"}},
        // AllWISE and CatWISE: w1mpro (profile-fit magnitude) and w1sigmpro; VizieR's W1mag and e_W1mag.
        {{"phot.mag;em.ir.3-4um"}, {"w1mpro", "w1mag", "w1_mag", "w1mpro_pm", "w1"}},
        {{"phot.mag;em.ir.4-8um"}, {"w2mpro", "w2mag", "w2_mag", "w2mpro_pm", "w2"}},
        {{}, {"e_bmag", "b_mag_error", "bmag_error", "e_bjmag"}},
        {{"stat.error;phot.mag;em.opt.v"}, {"e_vmag", "v_mag_error", "vmag_error", "e_vjmag"}},
        {{"stat.error;phot.mag;em.ir.3-4um"},
         {"w1sigmpro", "e_w1mag", "w1_mag_error", "w1mag_error", "w1sigmpro_pm", "w1err"}},
        {{"stat.error;phot.mag;em.ir.4-8um"},
         {"w2sigmpro", "e_w2mag", "w2_mag_error", "w2mag_error", "w2sigmpro_pm", "w2err"}},
        // Literature multiplicity: components of the system (by name only; no UCD1+ word says it).
        {{}, {"n_components", "ncomp", "n_comp", "components"}},
        // Spectral type: UCD1+ src.spType. Names that say which spectrum
        // the type came from (SpT_opt, SpT_IR) are left out on purpose: tables often give both, and two
        // name matches would make every such table ambiguous; pick one with --column spectral_type=.
        {{"src.sptype"}, {"spt", "sptype", "sp_type", "spectral_type", "spectype"}},
    }};
    return rules[static_cast<std::size_t>(field)];
}

bool keepsMetaMain(CatalogField field) {
    return field == CatalogField::SourceId || field == CatalogField::Ra || field == CatalogField::Dec;
}

bool isPhotometricError(CatalogField field) {
    return field == CatalogField::GError || field == CatalogField::BpError || field == CatalogField::RpError;
}

CatalogField fieldOrThrow(const std::string& name, std::string_view option) {
    const auto field = fieldFromName(name);
    if (!field) {
        throw InputError(std::string(option) + " " + name + ": unknown field (fields: " + allFieldNames() +
                         ")");
    }
    return *field;
}

std::string columnList(const std::vector<ColumnDescription>& columns) {
    constexpr std::size_t kMaxListed = 40;
    std::string list;
    for (std::size_t i = 0; i < columns.size() && i < kMaxListed; ++i) {
        list.append(i == 0 ? "" : " ").append(columns[i].name);
    }
    if (columns.size() > kMaxListed) {
        list += " ... (" + std::to_string(columns.size()) + " columns)";
    }
    return list;
}

struct Candidate {
    std::size_t index;
    std::string matched_by;
};

void throwIfAmbiguous(const std::vector<Candidate>& found, const std::vector<ColumnDescription>& columns,
                      CatalogField field, const std::string& where) {
    if (found.size() < 2) {
        return;
    }
    std::string names;
    for (const auto& candidate : found) {
        names.append(names.empty() ? "" : ", ").append(columns[candidate.index].name);
        names.append(" (").append(candidate.matched_by).append(")");
    }
    throw InputError(where + ": field " + std::string(fieldName(field)) + " is ambiguous: columns " + names +
                     " all match; choose one with --column " + std::string(fieldName(field)) + "=COLUMN");
}

std::optional<ResolvedColumn> chooseColumn(const std::vector<ColumnDescription>& columns, CatalogField field,
                                           const std::map<CatalogField, std::string>& user_columns,
                                           const std::string& where) {
    std::vector<Candidate> found;
    const auto user = user_columns.find(field);
    MappingRoute route = MappingRoute::User;
    if (user != user_columns.end()) {
        const std::string wanted = lowercase(user->second);
        if (wanted == kUnmappedColumn) {
            return std::nullopt; // the user leaves this field out (a required one then fails below)
        }
        for (std::size_t i = 0; i < columns.size(); ++i) {
            if (lowercase(columns[i].name) == wanted) {
                found.push_back({i, "--column " + std::string(fieldName(field)) + "=" + user->second});
            }
        }
        if (found.empty()) {
            throw InputError(where + ": --column " + std::string(fieldName(field)) + "=" + user->second +
                             ": no column " + user->second + " (columns: " + columnList(columns) + ")");
        }
    } else {
        const FieldRule& rule = fieldRule(field);
        route = MappingRoute::Ucd;
        for (std::size_t i = 0; i < columns.size(); ++i) {
            const std::string ucd = normalisedUcd(columns[i].ucd, field);
            if (!ucd.empty() && std::find(rule.ucds.begin(), rule.ucds.end(), ucd) != rule.ucds.end()) {
                found.push_back({i, "UCD " + columns[i].ucd});
            }
        }
        if (found.empty()) {
            route = MappingRoute::Name;
            for (std::size_t i = 0; i < columns.size(); ++i) {
                const std::string name = lowercase(trimmed(columns[i].name));
                if (std::find(rule.names.begin(), rule.names.end(), name) != rule.names.end()) {
                    found.push_back({i, "name " + columns[i].name});
                }
            }
        }
    }
    throwIfAmbiguous(found, columns, field, where);
    if (found.empty()) {
        return std::nullopt;
    }
    ResolvedColumn resolved;
    resolved.field = field;
    resolved.route = route;
    resolved.column_index = found.front().index;
    resolved.column_name = columns[resolved.column_index].name;
    resolved.matched_by = found.front().matched_by;
    return resolved;
}

void resolveUnit(ResolvedColumn& resolved, const ColumnDescription& column,
                 const std::map<CatalogField, std::string>& user_units, bool gaia_names_imply_mas,
                 const std::string& where) {
    const CatalogField field = resolved.field;
    const std::string name = lowercase(trimmed(column.name));
    const auto user = user_units.find(field);
    if (!trimmed(column.unit).empty()) {
        resolved.unit = trimmed(column.unit);
        resolved.unit_source = "TUNIT" + std::to_string(column.number);
    } else if (user != user_units.end()) {
        resolved.unit = user->second;
        resolved.unit_source = "--unit";
    } else if (gaia_names_imply_mas &&
               (field == CatalogField::Parallax || field == CatalogField::ParallaxError) &&
               name == fieldName(field)) {
        resolved.unit = "mas";
        resolved.unit_source = "Gaia name (mas)";
    } else {
        resolved.unit_source = "none";
    }
    if (field == CatalogField::SourceId) {
        return; // identifiers carry no unit worth checking
    }
    const std::string described =
        where + ": column " + column.name + " (" + std::string(fieldName(field)) + ")";
    resolved.flux_over_error =
        isPhotometricError(field) &&
        (name.find("flux_over_error") != std::string::npos || lowercase(column.ucd).starts_with("stat.snr"));
    if (resolved.flux_over_error) {
        if (!normalisedUnit(resolved.unit).empty()) {
            throw InputError(described + " is a flux-over-error ratio but has unit '" + resolved.unit +
                             "'; accepted: none (dimensionless)");
        }
        return;
    }
    const auto scale = unitScale(field, resolved.unit);
    if (!scale) {
        if (resolved.unit.empty()) {
            // CSV columns have no TFORM, and no keyword could state their unit.
            const std::string keyword =
                column.tform.empty() ? "" : "TUNIT" + std::to_string(column.number) + " or ";
            throw InputError(described + " has no unit; state it with " + keyword + "--unit " +
                             std::string(fieldName(field)) + "=UNIT (accepted: " + acceptedUnits(field) +
                             ")");
        }
        throw InputError(described + " has unit '" + resolved.unit + "'; accepted: " + acceptedUnits(field));
    }
    resolved.scale_to_canonical = *scale;
}

} // namespace

std::string normalisedUcd(std::string_view ucd, CatalogField field) {
    std::string result;
    std::string_view rest = ucd;
    while (!rest.empty()) {
        const auto semicolon = rest.find(';');
        const std::string word = lowercase(trimmed(rest.substr(0, semicolon)));
        rest = semicolon == std::string_view::npos ? std::string_view{} : rest.substr(semicolon + 1);
        if (word.empty() || (word == "meta.main" && !keepsMetaMain(field))) {
            continue;
        }
        result += result.empty() ? word : ";" + word;
    }
    return result;
}

bool isRequiredField(CatalogField field) {
    // Only the astrometry: a table without Gaia G (near- and mid-infrared lists of brown dwarfs) is
    // classified from the bands it has.
    return field == CatalogField::Parallax || field == CatalogField::ParallaxError;
}

std::span<const std::string_view> knownUcds(CatalogField field) {
    return fieldRule(field).ucds;
}

std::span<const std::string_view> knownNames(CatalogField field) {
    return fieldRule(field).names;
}

std::optional<CatalogField> fieldFromName(std::string_view name) {
    const std::string wanted = lowercase(trimmed(name));
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        if (kCatalogFieldNames[i] == wanted) {
            return static_cast<CatalogField>(i);
        }
    }
    return std::nullopt;
}

std::string allFieldNames() {
    std::string names;
    for (const auto name : kCatalogFieldNames) {
        names.append(names.empty() ? "" : " ").append(name);
    }
    return names;
}

std::string_view canonicalUnit(CatalogField field) {
    switch (field) {
    case CatalogField::SourceId:
    case CatalogField::Ruwe:
    case CatalogField::Components:
    case CatalogField::SpectralType:
        return "";
    case CatalogField::Ra:
    case CatalogField::Dec:
        return "deg";
    case CatalogField::Parallax:
    case CatalogField::ParallaxError:
        return "mas";
    case CatalogField::Pmra:
    case CatalogField::Pmdec:
        return "mas/yr";
    default:
        return "mag";
    }
}

std::optional<double> unitScale(CatalogField field, std::string_view unit) {
    const std::string wanted = normalisedUnit(unit);
    for (const auto& choice : unitChoices(field)) {
        if (choice.spelling == wanted) {
            return choice.scale;
        }
    }
    return std::nullopt;
}

std::string acceptedUnits(CatalogField field) {
    std::string list;
    for (const auto& choice : unitChoices(field)) {
        const std::string spelling = choice.spelling.empty() ? "none" : std::string(choice.spelling);
        list.append(list.empty() ? "" : ", ").append(spelling);
    }
    return list;
}

std::string_view routeName(MappingRoute route) {
    switch (route) {
    case MappingRoute::User:
        return "user";
    case MappingRoute::Ucd:
        return "UCD";
    default:
        return "name";
    }
}

MappingAttempt attemptColumns(const std::vector<ColumnDescription>& columns, const MappingRequest& request,
                              const std::string& where) {
    std::map<CatalogField, std::string> user_columns;
    for (const auto& [name, column] : request.user_columns) {
        user_columns[fieldOrThrow(name, "--column")] = column;
    }
    std::map<CatalogField, std::string> user_units;
    for (const auto& [name, unit] : request.user_units) {
        user_units[fieldOrThrow(name, "--unit")] = unit;
    }
    MappingAttempt attempt;
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const auto field = static_cast<CatalogField>(i);
        try {
            auto resolved = chooseColumn(columns, field, user_columns, where);
            if (!resolved) {
                if (isRequiredField(field)) {
                    std::string names;
                    for (const auto name : fieldRule(field).names) {
                        names.append(names.empty() ? "" : " ").append(name);
                    }
                    throw InputError(where + ": no column for " + std::string(fieldName(field)) +
                                     " (no UCD match, no column named " + names +
                                     "); name it with --column " + std::string(fieldName(field)) + "=COLUMN");
                }
                continue;
            }
            resolveUnit(*resolved, columns[resolved->column_index], user_units, request.gaia_names_imply_mas,
                        where);
            attempt.mapping.fields[i] = std::move(resolved);
        } catch (const InputError& error) {
            attempt.problems[i] = error.what();
        }
    }
    return attempt;
}

ColumnMapping resolveColumns(const std::vector<ColumnDescription>& columns, const MappingRequest& request,
                             const std::string& where) {
    MappingAttempt attempt = attemptColumns(columns, request, where);
    for (const auto& problem : attempt.problems) {
        if (!problem.empty()) {
            throw InputError(problem);
        }
    }
    return std::move(attempt.mapping);
}

} // namespace starcensus::photometry
