#include "photometry/StellarClass.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>

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

StellarClass dwarfClassOfCode(double spectral_code) {
    const double clamped = std::clamp(spectral_code, 0.0, 99.9);
    return static_cast<StellarClass>(static_cast<int>(clamped / 10.0));
}

std::string spectralTypeLabel(double spectral_code) {
    const double clamped = std::clamp(spectral_code, 0.0, 99.9);
    const int letter = static_cast<int>(clamped / 10.0);
    char buffer[16];
    std::snprintf(buffer, sizeof buffer, "%c%.1fV", kDwarfLetters[static_cast<std::size_t>(letter)],
                  clamped - 10.0 * letter);
    return buffer;
}

std::optional<double> parseSpectralType(std::string_view type) {
    while (!type.empty() && std::isspace(static_cast<unsigned char>(type.front()))) {
        type.remove_prefix(1);
    }
    if (type.empty()) {
        return std::nullopt;
    }
    const auto letter =
        kDwarfLetters.find(static_cast<char>(std::toupper(static_cast<unsigned char>(type[0]))));
    if (letter == std::string_view::npos) {
        return std::nullopt;
    }
    type.remove_prefix(1);
    double subtype = 0.0;
    const auto [end, error] = std::from_chars(type.data(), type.data() + type.size(), subtype);
    if (error != std::errc{} || end == type.data() || subtype < 0.0 || subtype >= 10.0) {
        return std::nullopt;
    }
    return 10.0 * static_cast<double>(letter) + subtype;
}

} // namespace starcensus::photometry
