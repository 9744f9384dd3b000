#include "photometry/SpectralType.h"

#include <algorithm>
#include <array>
#include <cctype>
#include <charconv>
#include <utility>

namespace starcensus::photometry {

namespace {

constexpr std::string_view kDwarfLetters = "OBAFGKMLTY";
// Sion et al. 1983 (from memory): composition letters A (hydrogen), B (He I), C (continuum), O (He II),
// Q (carbon), Z (metals), X (unclassifiable), in order of strength; feature letters P (magnetic, polarised),
// H (magnetic, no polarisation), E (emission), V (variable).
constexpr std::string_view kWhiteDwarfLetters = "ABCOQZXPHEV";
// Carbon (C, R, N) and S stars: giants whose types do not sit on the dwarf code scale.
constexpr std::string_view kEvolvedLetters = "CRNS";
constexpr std::string_view kGreaterOrEqualSign = "\xE2\x89\xA5"; // U+2265 in UTF-8

char toUpper(char c) {
    return static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
}
bool isDigit(char c) {
    return std::isdigit(static_cast<unsigned char>(c)) != 0;
}
bool isAlpha(char c) {
    return std::isalpha(static_cast<unsigned char>(c)) != 0;
}
bool isUpperCase(char c) {
    return std::isupper(static_cast<unsigned char>(c)) != 0;
}
bool isSpace(char c) {
    return std::isspace(static_cast<unsigned char>(c)) != 0;
}
bool isDwarfLetter(char c) {
    return isAlpha(c) && kDwarfLetters.find(toUpper(c)) != std::string_view::npos;
}

bool equalNoCase(std::string_view a, std::string_view b) {
    if (a.size() != b.size()) {
        return false;
    }
    for (std::size_t i = 0; i < a.size(); ++i) {
        if (toUpper(a[i]) != toUpper(b[i])) {
            return false;
        }
    }
    return true;
}

std::string_view trim(std::string_view text) {
    while (!text.empty() && isSpace(text.front())) {
        text.remove_prefix(1);
    }
    while (!text.empty() && isSpace(text.back())) {
        text.remove_suffix(1);
    }
    return text;
}

/// Markers catalogues print for "no type".
bool isBlankMarker(std::string_view text) {
    constexpr std::array<std::string_view, 7> kMarkers = {"", "nan", "null", "none", "-", "--", "..."};
    for (const std::string_view marker : kMarkers) {
        if (equalNoCase(text, marker)) {
            return true;
        }
    }
    return false;
}

/// A cursor over the part of a type string not read yet. Word matches ignore case.
class TypeReader {
  public:
    explicit TypeReader(std::string_view text) : rest_(text) {}

    std::string_view rest() const { return rest_; }
    bool atEnd() const { return rest_.empty(); }
    char peek(std::size_t offset = 0) const { return offset < rest_.size() ? rest_[offset] : '\0'; }
    void advance(std::size_t count) { rest_.remove_prefix(std::min(count, rest_.size())); }

    void skipSpaces() {
        while (!rest_.empty() && isSpace(rest_.front())) {
            rest_.remove_prefix(1);
        }
    }

    bool take(std::string_view word) {
        if (rest_.size() < word.size() || !equalNoCase(rest_.substr(0, word.size()), word)) {
            return false;
        }
        rest_.remove_prefix(word.size());
        return true;
    }

    /// An unsigned decimal number ("5", "5.5", "0.0"); nullopt (nothing consumed) if none starts here.
    std::optional<double> takeNumber() {
        std::size_t end = 0;
        while (end < rest_.size() && (isDigit(rest_[end]) || rest_[end] == '.')) {
            ++end;
        }
        double value = 0.0;
        if (end == 0 || !isDigit(rest_.front())) {
            return std::nullopt;
        }
        const auto [stop, error] = std::from_chars(rest_.data(), rest_.data() + end, value);
        if (error != std::errc{}) {
            return std::nullopt;
        }
        advance(static_cast<std::size_t>(stop - rest_.data()));
        return value;
    }

  private:
    std::string_view rest_;
};

/// Prefixes before the class letter: metal-poor "sd"/"esd"/"usd" (a hedged "d/sd" or "(sd)" is uncertain),
/// and the Mount Wilson luminosity prefixes "d" (dwarf) and "g" (giant) written before a capital letter.
void readPrefixes(TypeReader& in, LiteratureType& type) {
    if (in.take("d/sd") || in.take("(sd)")) {
        type.subdwarf = SubdwarfPrefix::Subdwarf;
        type.uncertain = true;
    } else if (in.take("usd")) {
        type.subdwarf = SubdwarfPrefix::Ultra;
    } else if (in.take("esd")) {
        type.subdwarf = SubdwarfPrefix::Extreme;
    } else if (in.take("sd")) {
        type.subdwarf = SubdwarfPrefix::Subdwarf;
    } else if ((in.peek() == 'd' || in.peek() == 'g') && isUpperCase(in.peek(1)) &&
               isDwarfLetter(in.peek(1))) {
        type.luminosity_class = in.peek() == 'd' ? LuminosityClass::Dwarf : LuminosityClass::Giant;
        in.advance(1);
    }
}

/// A dwarf letter and its optional subtype ("M5.5", "K 2", "T"), into class and spectral code.
bool readDwarfType(TypeReader& in, LiteratureType& type) {
    if (!isDwarfLetter(in.peek())) {
        type.reason = "no spectral class letter at '" + std::string(in.rest()) + "'";
        return false;
    }
    const auto letter_index = static_cast<double>(kDwarfLetters.find(toUpper(in.peek())));
    in.advance(1);
    type.stellar_class = dwarfClassOfCode(10.0 * letter_index);
    in.skipSpaces();
    const std::string_view subtype_text = in.rest();
    if (const auto subtype = in.takeNumber()) {
        if (*subtype >= 10.0) {
            type.reason = "subtype " +
                          std::string(subtype_text.substr(0, subtype_text.size() - in.rest().size())) +
                          " is not below 10";
            return false;
        }
        type.spectral_code = 10.0 * letter_index + *subtype;
    }
    return true;
}

/// "D" + letters + optional temperature index (Sion et al. 1983).
void readWhiteDwarfType(TypeReader& in, LiteratureType& type) {
    in.advance(1); // the D
    type.stellar_class = StellarClass::WhiteDwarf;
    while (isAlpha(in.peek()) && kWhiteDwarfLetters.find(toUpper(in.peek())) != std::string_view::npos) {
        type.white_dwarf_letters += toUpper(in.peek());
        in.advance(1);
    }
    in.skipSpaces();
    type.white_dwarf_temperature_index = in.takeNumber();
}

/// Metallic-line stars "kA2hA5mA7": types from the Ca II K line, the hydrogen lines and the metal lines.
/// The hydrogen type is kept, as it follows temperature best (common practice, from memory); the star is
/// flagged peculiar (chemically peculiar, Am).
bool readMetallicLineType(TypeReader& in, LiteratureType& type) {
    LiteratureType k_line_type;
    in.advance(1); // the k
    if (!readDwarfType(in, k_line_type) || !in.take("h")) {
        type.reason = "metallic-line type without a hydrogen ('h') part";
        return false;
    }
    if (!readDwarfType(in, type)) {
        return false;
    }
    if (in.take("m")) {
        LiteratureType metal_line_type;
        if (!readDwarfType(in, metal_line_type)) {
            type.reason = metal_line_type.reason;
            return false;
        }
    }
    type.peculiar = true;
    return true;
}

/// The class itself: a metallic-line type, a white dwarf, a carbon or S star, or a dwarf letter.
bool readClass(TypeReader& in, LiteratureType& type) {
    const char first = in.peek();
    if (first == 'k' && isDwarfLetter(in.peek(1))) {
        return readMetallicLineType(in, type);
    }
    if (first == 'D' || first == 'd') { // a "d" before a capital letter was read as a prefix already
        readWhiteDwarfType(in, type);
        return true;
    }
    if (kEvolvedLetters.find(first) != std::string_view::npos && isDigit(in.peek(1))) {
        in.advance(1);
        in.takeNumber();
        type.stellar_class = StellarClass::Evolved;
        return true;
    }
    return readDwarfType(in, type);
}

/// The value of the first spelling in `table` that the reader takes (so longer spellings go first).
template <class Value, std::size_t N>
std::optional<Value> takeFirstOf(TypeReader& in,
                                 const std::array<std::pair<std::string_view, Value>, N>& table) {
    for (const auto& [spelling, value] : table) {
        if (in.take(spelling)) {
            return value;
        }
    }
    return std::nullopt;
}

std::optional<LuminosityClass> takeRomanNumeral(TypeReader& in) {
    // Longest spelling first, so "III" is not read as "II" + "I".
    constexpr std::array<std::pair<std::string_view, LuminosityClass>, 9> kNumerals = {{
        {"III", LuminosityClass::Giant},
        {"Iab", LuminosityClass::Supergiant},
        {"Ia", LuminosityClass::Supergiant},
        {"Ib", LuminosityClass::Supergiant},
        {"II", LuminosityClass::BrightGiant},
        {"IV", LuminosityClass::Subgiant},
        {"I", LuminosityClass::Supergiant},
        {"VI", LuminosityClass::Subdwarf},
        {"V", LuminosityClass::Dwarf},
    }};
    return takeFirstOf(in, kNumerals);
}

/// "V", "IV", "IV-V", "IV/V": a range is read as its later (fainter) class, the enum's larger value.
bool readLuminosityClass(TypeReader& in, LiteratureType& type) {
    const auto first = takeRomanNumeral(in);
    if (!first) {
        return false;
    }
    type.luminosity_class = *first;
    if (in.peek() == '-' || in.peek() == '/') {
        TypeReader after_separator(in.rest().substr(1));
        if (const auto second = takeRomanNumeral(after_separator)) {
            type.luminosity_class = std::max(*first, *second);
            in = after_separator;
        }
    }
    return true;
}

bool readGravity(TypeReader& in, LiteratureType& type) {
    // Allers & Liu 2013 near-infrared classes, then the optical Greek letters (spelled or in UTF-8).
    constexpr std::array<std::pair<std::string_view, SurfaceGravity>, 11> kGravityWords = {{
        {"FLD-G", SurfaceGravity::Field},
        {"INT-G", SurfaceGravity::Intermediate},
        {"VL-G", SurfaceGravity::VeryLow},
        {"alpha", SurfaceGravity::Field},
        {"beta", SurfaceGravity::Intermediate},
        {"gamma", SurfaceGravity::VeryLow},
        {"delta", SurfaceGravity::ExtremelyLow},
        {"\xCE\xB1", SurfaceGravity::Field},
        {"\xCE\xB2", SurfaceGravity::Intermediate},
        {"\xCE\xB3", SurfaceGravity::VeryLow},
        {"\xCE\xB4", SurfaceGravity::ExtremelyLow},
    }};
    if (const auto gravity = takeFirstOf(in, kGravityWords)) {
        type.gravity = *gravity;
        return true;
    }
    return false;
}

/// Everything after the class: uncertainty marks, luminosity class, gravity class and MK remarks, in any
/// order. Parentheses only group ("(e)", "(pec?)", "(red)") and are read as spaces.
bool readSuffixes(TypeReader& in, LiteratureType& type, std::string_view whole) {
    while (true) {
        while (isSpace(in.peek()) || in.peek() == '(' || in.peek() == ')') {
            in.advance(1);
        }
        if (in.atEnd()) {
            return true;
        }
        if (in.take(":") || in.take("?")) {
            type.uncertain = true;
        } else if (readGravity(in, type)) {
        } else if (in.take("pec") || in.take("red") || in.take("blue")) {
            type.peculiar = true; // "(red)"/"(blue)": an unusually red or blue spectrum
        } else if (in.take("or later")) {
            type.lower_limit = true;
        } else if (in.take("var") || in.take("nn")) {
            // variable; very broad ("nebulous") lines: no bearing on the type
        } else if (readLuminosityClass(in, type)) {
        } else if (in.take("p")) {
            type.peculiar = true;
        } else if (in.take("e")) {
            type.emission = true;
        } else if (in.take("k") || in.take("n") || in.take("s")) {
            // MK remarks: interstellar K line, broad lines, sharp lines: no bearing on the type
        } else {
            type.reason = "not understood: '" + std::string(in.rest()) + "' in '" + std::string(whole) + "'";
            return false;
        }
    }
}

/// One component of a possibly composite type, into `type`; false with `type.reason` set if refused.
bool readComponent(std::string_view text, LiteratureType& type) {
    TypeReader in(trim(text));
    if (in.atEnd()) {
        type.reason = "empty component";
        return false;
    }
    if (in.take(kGreaterOrEqualSign) || in.take(">=") || in.take(">")) {
        type.lower_limit = true;
        in.skipSpaces();
    }
    readPrefixes(in, type);
    return readClass(in, type) && readSuffixes(in, type, text);
}

LiteratureType refused(std::string reason) {
    LiteratureType type;
    type.reason = std::move(reason);
    return type;
}

} // namespace

bool isBlankLiteratureType(std::string_view text) {
    return isBlankMarker(trim(text));
}

LiteratureType parseLiteratureType(std::string_view text) {
    const std::string_view trimmed = trim(text);
    if (isBlankMarker(trimmed)) {
        return refused("empty");
    }
    // "M8+L0", "DA+dM": the first component is the primary; the companion must read too, but is not kept.
    const std::size_t plus = trimmed.find('+');
    LiteratureType type;
    if (!readComponent(trimmed.substr(0, plus), type)) {
        return refused(type.reason);
    }
    if (plus != std::string_view::npos) {
        type.composite = true;
        LiteratureType companion;
        if (!readComponent(trimmed.substr(plus + 1), companion)) {
            return refused("companion: " + companion.reason);
        }
    }
    type.parsed = true;
    return type;
}

} // namespace starcensus::photometry
