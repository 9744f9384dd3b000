#include "photometry/StellarClass.h"

#include "photometry/SpectralType.h"

#include <algorithm>
#include <charconv>
#include <cmath>

namespace starcensus::photometry {

namespace {
constexpr std::string_view kDwarfLetters = "OBAFGKMLTY";
}

std::optional<StellarClass> classFromName(std::string_view name) {
    for (std::size_t i = 0; i < kClassCount; ++i) {
        if (kClassNames[i] == name) {
            return static_cast<StellarClass>(i);
        }
    }
    return std::nullopt;
}

Category categoryOf(StellarClass stellar_class, double spectral_code) {
    switch (stellar_class) {
    case StellarClass::WhiteDwarf:
        return static_cast<Category>(kDwarfCategories);
    case StellarClass::Evolved:
        return static_cast<Category>(kDwarfCategories + 1);
    case StellarClass::Unclassified:
        return unclassifiedCategory(UnclassifiedReason::OutsideLoci);
    default: {
        // Keep the code inside its letter so the category never contradicts the class.
        const double letter_start = 10.0 * static_cast<double>(static_cast<int>(stellar_class));
        const double code = std::isfinite(spectral_code) ? spectral_code : letter_start;
        return static_cast<Category>(std::clamp(code, letter_start, letter_start + 9.999));
    }
    }
}

Category unclassifiedCategory(UnclassifiedReason reason) {
    return static_cast<Category>(kDwarfCategories + 2 + static_cast<std::size_t>(reason));
}

std::optional<UnclassifiedReason> reasonOfCategory(Category category) {
    if (category < kDwarfCategories + 2 || category >= kCategoryCount) {
        return std::nullopt;
    }
    return static_cast<UnclassifiedReason>(category - kDwarfCategories - 2);
}

StellarClass classOfCategory(Category category) {
    if (category < kDwarfCategories) {
        return static_cast<StellarClass>(category / 10);
    }
    return category == kDwarfCategories       ? StellarClass::WhiteDwarf
           : category == kDwarfCategories + 1 ? StellarClass::Evolved
                                              : StellarClass::Unclassified;
}

StellarClass dwarfClassOfCode(double spectral_code) {
    const double clamped = std::clamp(spectral_code, 0.0, 99.9);
    return static_cast<StellarClass>(static_cast<int>(clamped / 10.0));
}

std::string spectralTypeLabel(double spectral_code) {
    const double clamped = std::clamp(spectral_code, 0.0, 99.9);
    const int letter = static_cast<int>(clamped / 10.0);
    // "%c%.1fV" by to_chars, which rounds as printf does without its format parsing (sample.fits writes
    // one label per candidate).
    char buffer[16];
    buffer[0] = kDwarfLetters[static_cast<std::size_t>(letter)];
    char* end = std::to_chars(buffer + 1, buffer + sizeof buffer - 1, clamped - 10.0 * letter,
                              std::chars_format::fixed, 1)
                    .ptr;
    *end++ = 'V';
    return std::string(buffer, end);
}

std::optional<double> parseSpectralType(std::string_view type) {
    const LiteratureType parsed = parseLiteratureType(type);
    const bool dwarf_letter = parsed.parsed && parsed.stellar_class < StellarClass::WhiteDwarf;
    return dwarf_letter ? parsed.spectral_code : std::nullopt;
}

} // namespace starcensus::photometry
