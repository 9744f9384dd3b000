#include "photometry/catalog/ColumnSuggestion.h"

#include <algorithm>
#include <array>
#include <cctype>
#include <optional>
#include <set>
#include <sstream>
#include <string_view>

namespace starcensus::photometry {

namespace {

// Score parts, documented in ColumnSuggestion.h and README.md (Inspecting an unknown table).
constexpr int kUcdMatch = 50;
constexpr int kUcdClose = 25;
constexpr int kUnitStated = 20;
constexpr int kUnitInName = 10;
constexpr int kUnitRefused = -50;
constexpr int kKnownName = 40;
constexpr int kStemToken = 30;
constexpr int kOwnSurvey = 10;
constexpr int kOtherSurvey = -10;
constexpr int kOtherBand = -25;
constexpr int kCellsNotNumbers = -10;
constexpr int kEveryCellNull = -30;

using Words = std::vector<std::string_view>;

// The stems a name token is compared with, per value field (error fields use their value field's).
const Words& stems(CatalogField field) {
    static const std::array<Words, kCatalogFieldCount> table = [] {
        std::array<Words, kCatalogFieldCount> stems_by_field;
        auto set = [&](CatalogField f, Words words) {
            stems_by_field[static_cast<std::size_t>(f)] = std::move(words);
        };
        set(CatalogField::SourceId, {"sourceid", "source", "id", "objid"});
        set(CatalogField::Ra, {"ra", "raj2000", "radeg", "raicrs", "alpha"});
        set(CatalogField::Dec, {"dec", "de", "decl", "dej2000", "decdeg", "deicrs", "delta"});
        set(CatalogField::Parallax, {"parallax", "plx", "par", "pi", "px", "varpi"});
        set(CatalogField::Pmra, {"pmra", "mura", "pmalpha"});
        set(CatalogField::Pmdec, {"pmdec", "pmde", "mudec", "mude", "pmdelta"});
        set(CatalogField::G, {"g", "gaiag"});
        set(CatalogField::Bp, {"bp", "gbp"});
        set(CatalogField::Rp, {"rp", "grp"});
        set(CatalogField::J, {"j"});
        set(CatalogField::H, {"h"});
        set(CatalogField::Ks, {"ks", "k"});
        set(CatalogField::Ruwe, {"ruwe"});
        set(CatalogField::B, {"b", "bj"});
        set(CatalogField::V, {"v", "vj"});
        set(CatalogField::W1, {"w1"});
        set(CatalogField::W2, {"w2"});
        set(CatalogField::SpectralType, {"spt", "sptype", "spectype", "spectral", "sp"});
        return stems_by_field;
    }();
    return table[static_cast<std::size_t>(field)];
}

bool contains(const Words& words, std::string_view word) {
    return std::find(words.begin(), words.end(), word) != words.end();
}

// The value field of an error field ("g_error" -> g); nullopt for value fields.
std::optional<CatalogField> valueFieldOf(CatalogField field) {
    const std::string_view name = fieldName(field);
    if (!name.ends_with("_error")) {
        return std::nullopt;
    }
    return fieldFromName(name.substr(0, name.size() - 6));
}

bool isBand(CatalogField field) {
    const auto value = valueFieldOf(field).value_or(field);
    return value >= CatalogField::G && value != CatalogField::Ruwe && value != CatalogField::SpectralType &&
           !valueFieldOf(value);
}

bool isAnyStem(std::string_view token) {
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        if (contains(stems(static_cast<CatalogField>(i)), token)) {
            return true;
        }
    }
    return false;
}

// Survey words: the field's own release and those of other surveys that measure a similar band.
struct SurveyWords {
    Words own;
    Words other;
};

const SurveyWords& surveyWords(CatalogField field) {
    static const SurveyWords gaia{{"gaia", "dr2", "dr3", "edr3", "gaiadr2", "gaiadr3", "gaiaedr3"},
                                  {"p1", "ps1", "panstarrs", "sdss", "des", "skymapper", "smss"}};
    static const SurveyWords two_mass{{"2mass", "tmass", "2m"}, {"mko", "ukidss", "ukirt", "vhs", "vista"}};
    static const SurveyWords wise{{"wise", "allwise", "catwise", "unwise"}, {"spitzer", "irac"}};
    static const SurveyWords none{};
    switch (valueFieldOf(field).value_or(field)) {
    case CatalogField::G:
    case CatalogField::Bp:
    case CatalogField::Rp:
    case CatalogField::SourceId:
    case CatalogField::Ruwe:
        return gaia;
    case CatalogField::J:
    case CatalogField::H:
    case CatalogField::Ks:
        return two_mass;
    case CatalogField::W1:
    case CatalogField::W2:
        return wise;
    default:
        return none;
    }
}

// Tokens that make a column something other than a measurement of the field.
const Words kExcludingTokens = {
    "ref",  "flag", "flg", "src", "nphot", "n",     "nb",   "qf",
    "note", "dist", "abs", "num", "count", "neigh", "nobs", "ratio",
};
const Words kErrorTokens = {"e",   "err",    "error",       "errs",    "sig",     "sigma",
                            "unc", "uncert", "uncertainty", "msigcom", "sigmpro", "cmsig"};
// Longest first, so "sigmpro" is removed before "sig".
const Words kErrorSuffixes = {"sigmpro", "msigcom", "error", "sigma", "err", "sig", "unc"};

struct UnitToken {
    std::string_view token;
    std::string_view unit;
};
constexpr std::array<UnitToken, 6> kUnitTokens = {{{"mas", "mas"},
                                                   {"uas", "uas"},
                                                   {"arcsec", "arcsec"},
                                                   {"deg", "deg"},
                                                   {"mag", "mag"},
                                                   {"masyr", "mas/yr"}}};

// What a column name says, read as described in ColumnSuggestion.h.
struct NameReading {
    std::vector<std::string> raw;    // lower-case tokens as split
    std::vector<std::string> tokens; // stems left after markers, units and suffixes are removed
    bool error_marker = false;
    std::string excluded_by; // the token that rules the column out, "" if none
    std::string unit;        // unit implied by the name
};

std::string stripped(std::string token, NameReading& reading) {
    for (const auto suffix : kErrorSuffixes) {
        if (token.size() > suffix.size() && token.ends_with(suffix)) {
            token.resize(token.size() - suffix.size());
            reading.error_marker = true;
            break;
        }
    }
    for (const std::string_view suffix : {"mag", "mpro"}) {
        if (token.size() > suffix.size() && token.ends_with(suffix)) {
            token.resize(token.size() - suffix.size());
            if (suffix == "mag") {
                reading.unit = "mag";
            }
            break;
        }
    }
    if (token.size() > 1 && token.front() == 'e' && !isAnyStem(token) && isAnyStem(token.substr(1))) {
        token.erase(0, 1);
        reading.error_marker = true;
    }
    return token;
}

NameReading readName(std::string_view name) {
    NameReading reading;
    std::string current;
    for (const char c : name) {
        if (std::isalnum(static_cast<unsigned char>(c))) {
            current += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        } else if (!current.empty()) {
            reading.raw.push_back(std::move(current));
            current.clear();
        }
    }
    if (!current.empty()) {
        reading.raw.push_back(std::move(current));
    }
    for (std::size_t i = 0; i < reading.raw.size(); ++i) {
        const std::string& token = reading.raw[i];
        const auto unit = std::find_if(kUnitTokens.begin(), kUnitTokens.end(),
                                       [&](const UnitToken& candidate) { return candidate.token == token; });
        if (unit != kUnitTokens.end()) {
            reading.unit = unit->unit;
        } else if (contains(kErrorTokens, token)) {
            reading.error_marker = true;
        } else if (token == "m") {
            // "M_G", "M_J": an absolute magnitude; a trailing m ("j_m", 2MASS) is the magnitude itself.
            if (i + 1 < reading.raw.size()) {
                reading.excluded_by = "m (absolute magnitude)";
            }
        } else {
            std::string stem = stripped(token, reading);
            if (contains(kExcludingTokens, stem) && reading.excluded_by.empty()) {
                reading.excluded_by = stem;
            }
            reading.tokens.push_back(std::move(stem));
        }
    }
    // "g_bp" and "pm_ra" are one stem written in two tokens.
    for (std::size_t i = 0; i + 1 < reading.tokens.size(); ++i) {
        const std::string joined = reading.tokens[i] + reading.tokens[i + 1];
        if (isAnyStem(joined)) {
            reading.tokens[i] = joined;
            reading.tokens.erase(reading.tokens.begin() + static_cast<std::ptrdiff_t>(i) + 1);
        }
    }
    return reading;
}

std::set<std::string> ucdWords(const std::string& normalised) {
    std::set<std::string> words;
    std::istringstream stream(normalised);
    std::string word;
    while (std::getline(stream, word, ';')) {
        words.insert(word);
    }
    return words;
}

bool isErrorWord(const std::string& word) {
    return word == "stat.error" || word == "stat.snr";
}

bool isGenericWord(const std::string& word) {
    return isErrorWord(word) || word == "phot.mag" || word == "phot.flux" || word == "meta.main";
}

// UCD evidence: the points and their reason; 0 points if the UCD says nothing about the field.
std::pair<int, std::string> ucdEvidence(CatalogField field, const ColumnDescription& column) {
    const std::string ucd = normalisedUcd(column.ucd, field);
    if (ucd.empty()) {
        return {0, ""};
    }
    const auto known = knownUcds(field);
    if (std::find(known.begin(), known.end(), ucd) != known.end()) {
        return {kUcdMatch, "UCD " + column.ucd};
    }
    const auto words = ucdWords(ucd);
    const bool column_is_error = std::any_of(words.begin(), words.end(), isErrorWord);
    for (const auto known_ucd : known) {
        for (const auto& word : ucdWords(std::string(known_ucd))) {
            if (!isGenericWord(word) && words.count(word) != 0 &&
                column_is_error == valueFieldOf(field).has_value()) {
                return {kUcdClose, "UCD " + column.ucd + " close to " + std::string(known_ucd)};
            }
        }
    }
    return {0, ""};
}

std::string signedPoints(int points) {
    return (points > 0 ? " +" : " ") + std::to_string(points);
}

struct Scored {
    int score = 0;
    std::string reasons;
    void add(int points, const std::string& reason) {
        score += points;
        reasons.append(reasons.empty() ? "" : ", ").append(reason).append(signedPoints(points));
    }
};

// Name evidence: a known name, else a stem token; false if the name says nothing about the field.
bool addNameEvidence(Scored& scored, CatalogField field, const std::string& column_name,
                     const NameReading& name) {
    std::string lower = column_name;
    std::transform(lower.begin(), lower.end(), lower.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    const auto known = knownNames(field);
    if (std::find(known.begin(), known.end(), lower) != known.end()) {
        scored.add(kKnownName, "known name " + column_name);
        return true;
    }
    const Words& own_stems = stems(valueFieldOf(field).value_or(field));
    const auto stem = std::find_if(name.tokens.begin(), name.tokens.end(),
                                   [&](const std::string& token) { return contains(own_stems, token); });
    if (stem == name.tokens.end()) {
        return false;
    }
    scored.add(kStemToken, "name token " + *stem);
    return true;
}

// Release tokens, and the stems of other bands in a band's name.
void addQualifierEvidence(Scored& scored, CatalogField field, const NameReading& name) {
    const SurveyWords& surveys = surveyWords(field);
    for (const auto& token : name.raw) {
        if (contains(surveys.own, token)) {
            scored.add(kOwnSurvey, "release " + token);
        } else if (contains(surveys.other, token)) {
            scored.add(kOtherSurvey, "other survey " + token);
        }
    }
    if (!isBand(field)) {
        return;
    }
    const CatalogField own_band = valueFieldOf(field).value_or(field);
    for (std::size_t i = 0; i < kCatalogFieldCount; ++i) {
        const auto other = static_cast<CatalogField>(i);
        if (!isBand(other) || valueFieldOf(other) || other == own_band) {
            continue;
        }
        const auto& other_stems = stems(other);
        if (std::any_of(name.tokens.begin(), name.tokens.end(),
                        [&](const std::string& token) { return contains(other_stems, token); })) {
            scored.add(kOtherBand, "also names " + std::string(fieldName(other)));
        }
    }
}

// The stated unit, else the one the name implies.
void addUnitEvidence(Scored& scored, CatalogField field, const std::string& stated_unit,
                     const NameReading& name) {
    if (!stated_unit.empty()) {
        if (unitScale(field, stated_unit)) {
            scored.add(kUnitStated, "unit " + stated_unit);
        } else {
            scored.add(kUnitRefused, "unit " + stated_unit + " is not " + std::string(canonicalUnit(field)));
        }
    } else if (!name.unit.empty() && !isTextField(field)) {
        if (unitScale(field, name.unit)) {
            scored.add(kUnitInName, "unit " + name.unit + " in the name");
        } else {
            scored.add(kUnitRefused, "name says " + name.unit + ", not " + std::string(canonicalUnit(field)));
        }
    }
}

void addCellEvidence(Scored& scored, CatalogField field, const ColumnProfile& column) {
    if (column.numbers == 0 && column.texts == 0) {
        scored.add(kEveryCellNull, "every cell null");
    }
    if (!isTextField(field) && column.texts > 0) {
        scored.add(kCellsNotNumbers,
                   std::to_string(column.texts) + " cells not numbers ('" + column.samples.front() + "')");
    }
}

std::optional<ColumnCandidate> scoreColumn(CatalogField field, const ColumnProfile& column,
                                           std::size_t index) {
    const bool text_field = isTextField(field);
    const bool kind_fits = text_field ? column.kind == ColumnKind::Text || column.kind == ColumnKind::Mixed
                                      : column.kind == ColumnKind::Number || column.kind == ColumnKind::Mixed;
    if (!kind_fits) {
        return std::nullopt;
    }
    const NameReading name = readName(column.description.name);
    if (!name.excluded_by.empty() || name.error_marker != valueFieldOf(field).has_value()) {
        return std::nullopt;
    }
    Scored scored;
    const auto [ucd_points, ucd_reason] = ucdEvidence(field, column.description);
    if (ucd_points != 0) {
        scored.add(ucd_points, ucd_reason);
    }
    const bool named = addNameEvidence(scored, field, column.description.name, name);
    if (!named && ucd_points == 0) {
        return std::nullopt; // a unit alone says nothing about which quantity a column holds
    }
    addQualifierEvidence(scored, field, name);
    addUnitEvidence(scored, field, column.description.unit, name);
    addCellEvidence(scored, field, column);
    if (scored.score <= 0) {
        return std::nullopt;
    }
    const bool unit_from_name = column.description.unit.empty() && !text_field;
    return ColumnCandidate{index, scored.score, scored.reasons, unit_from_name ? name.unit : std::string()};
}

} // namespace

std::vector<ColumnCandidate> rankCandidates(CatalogField field, const std::vector<ColumnProfile>& columns,
                                            std::size_t limit) {
    std::vector<ColumnCandidate> candidates;
    for (std::size_t i = 0; i < columns.size(); ++i) {
        if (auto candidate = scoreColumn(field, columns[i], i)) {
            candidates.push_back(std::move(*candidate));
        }
    }
    std::stable_sort(candidates.begin(), candidates.end(),
                     [](const ColumnCandidate& a, const ColumnCandidate& b) { return a.score > b.score; });
    if (candidates.size() > limit) {
        candidates.resize(limit);
    }
    return candidates;
}

} // namespace starcensus::photometry
