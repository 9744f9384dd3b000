#pragma once
// The classes a census counts, and the numeric spectral-type code used throughout.
//
// Spectral code: O0 = 0, B0 = 10, A0 = 20, F0 = 30, G0 = 40, K0 = 50, M0 = 60, L0 = 70, T0 = 80, Y0 = 90,
// so G2V is 42.0 and M4.5V is 64.5 (common practice, no source: the usual decimal subtype scale).
#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace starcensus::photometry {

enum class StellarClass : std::uint8_t {
    O,
    B,
    A,
    F,
    G,
    K,
    M,
    L,
    T,
    Y,
    WhiteDwarf,
    Evolved,
    Unclassified,
};

inline constexpr std::size_t kClassCount = 13;
inline constexpr std::array<std::string_view, kClassCount> kClassNames = {
    "O", "B", "A", "F", "G", "K", "M", "L", "T", "Y", "WD", "evolved", "unclassified"};

constexpr std::string_view className(StellarClass c) {
    return kClassNames[static_cast<std::size_t>(c)];
}

std::optional<StellarClass> classFromName(std::string_view name);

/// Why an object has no class. Each reason is a census category of its own, so the counts keep it.
enum class UnclassifiedReason : std::uint8_t {
    OutsideLoci,    // photometry present, but on no locus or sequence the classifier knows
    NoPhotometry,   // none of G, J, or two of B, V, H, Ks, W1, W2: no band the classifier can place
    LowParallaxSnr, // parallax / error below the classification threshold (--min-parallax-snr)
};
inline constexpr std::size_t kUnclassifiedReasonCount = 3;
inline constexpr std::array<std::string_view, kUnclassifiedReasonCount> kUnclassifiedReasonNames = {
    "outside_loci", "no_photometry", "low_parallax_snr"};

constexpr std::string_view reasonName(UnclassifiedReason reason) {
    return kUnclassifiedReasonNames[static_cast<std::size_t>(reason)];
}

/// Census categories: the finest unit the Monte Carlo counts. Dwarfs are binned by whole subtypes of the
/// spectral code (category = floor(code), 0..99), then white dwarfs, evolved stars and one category per
/// unclassified reason (in UnclassifiedReason order). Classes and user-defined groups (e.g. FGK, M0-M4)
/// are unions of categories; the class `unclassified` is the union of the reasons.
inline constexpr std::size_t kDwarfCategories = 100;
inline constexpr std::size_t kCategoryCount = kDwarfCategories + 2 + kUnclassifiedReasonCount;
using Category = std::uint8_t;

/// The category of a class and code; Unclassified gives the OutsideLoci category.
Category categoryOf(StellarClass stellar_class, double spectral_code);
Category unclassifiedCategory(UnclassifiedReason reason);
StellarClass classOfCategory(Category category);
/// The reason of an unclassified category; nullopt for the categories of classes.
std::optional<UnclassifiedReason> reasonOfCategory(Category category);

/// The dwarf letter class (O..Y) of a spectral code; codes beyond Y9.5 stay Y.
StellarClass dwarfClassOfCode(double spectral_code);

/// "G2.0V"-style label of a spectral code.
std::string spectralTypeLabel(double spectral_code);

/// The spectral code of "M4.5 V", "G2V", "L1", "T7.5", "G8 IV" (luminosity class ignored): the code of
/// parseLiteratureType (SpectralType.h) for the letters O-Y; nullopt for white dwarfs, types without a
/// subtype and strings it refuses.
std::optional<double> parseSpectralType(std::string_view type);

} // namespace starcensus::photometry
