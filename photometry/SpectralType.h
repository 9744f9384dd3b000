#pragma once
// Spectral types as catalogues print them ("M4.5 V", "L0: INT-G", "DA7.8", "≥Y4", "kA2hA5mA7 V"), turned
// into the project's classes and spectral codes (StellarClass.h). Pure: no I/O, no locale.
//
// Conventions (all from memory): the MK system of Morgan & Keenan (letters, decimal subtypes, Roman
// luminosity classes, suffixes e/k/n/s/p); the white-dwarf notation of Sion et al. 1983, ApJ 269, 253
// ("D" + composition letters + temperature index 50400/Teff); the optical gravity classes α/β/γ/δ of
// Kirkpatrick 2005 and Cruz et al. 2009 and the near-infrared ones FLD-G/INT-G/VL-G of Allers & Liu 2013,
// ApJ 772, 79.
#include "photometry/StellarClass.h"

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace starcensus::photometry {

/// Roman luminosity class. A range ("IV-V", "IV/V") is read as its later, fainter class (V).
enum class LuminosityClass : std::uint8_t {
    Unstated,
    Supergiant,  // I, Ia, Iab, Ib
    BrightGiant, // II
    Giant,       // III
    Subgiant,    // IV
    Dwarf,       // V, or the Mount Wilson prefix "d" ("dM4")
    Subdwarf,    // VI
};

/// Metal-poor prefix: "sd", "esd", "usd" (subdwarf, extreme, ultra).
enum class SubdwarfPrefix : std::uint8_t { None, Subdwarf, Extreme, Ultra };

/// Surface-gravity class of young ultracool dwarfs. Optical α/β/γ/δ and near-infrared FLD-G/INT-G/VL-G are
/// merged as α = FLD-G (field), β = INT-G (intermediate), γ = VL-G (very low); δ (extremely low) has no
/// near-infrared twin. The correspondence is approximate (Allers & Liu 2013 compare them; from memory).
enum class SurfaceGravity : std::uint8_t { Unstated, Field, Intermediate, VeryLow, ExtremelyLow };

/// What a literature spectral type says. When `parsed` is false only `reason` is meaningful.
struct LiteratureType {
    bool parsed = false;
    std::string reason; // why it was refused; empty when parsed

    /// Dwarf letter O..Y (whatever the luminosity class), WhiteDwarf, or Evolved for carbon and S stars.
    StellarClass stellar_class = StellarClass::Unclassified;
    std::optional<double> spectral_code; // O0 = 0 ... Y0 = 90; absent without a subtype and for white dwarfs
    LuminosityClass luminosity_class = LuminosityClass::Unstated;
    SubdwarfPrefix subdwarf = SubdwarfPrefix::None;
    SurfaceGravity gravity = SurfaceGravity::Unstated;

    bool uncertain = false;   // ":" "::" "?", or a hedged prefix "d/sd", "(sd)"
    bool peculiar = false;    // "pec", "p", "(red)", "(blue)", or a metallic-line (Am) type
    bool emission = false;    // "e", "(e)"
    bool lower_limit = false; // "≥Y4", ">=Y4", "(or later)": the type is this late or later
    bool composite = false;   // "M8+L0": the fields describe the first (primary) component

    std::string white_dwarf_letters;                     // "A", "AZ", "BQA" (after the "D")
    std::optional<double> white_dwarf_temperature_index; // 50400 K / Teff, as printed ("DA7.8" -> 7.8)
};

/// Reads one catalogue spectral-type string. Never throws; blank markers ("", "NaN", "null", "--", "...")
/// are refused with reason "empty", anything else not understood with a reason quoting the part.
LiteratureType parseLiteratureType(std::string_view text);

/// True for the blank markers parseLiteratureType() refuses as "empty" (surrounding blanks ignored), so a
/// reader can count a null without parsing the string.
bool isBlankLiteratureType(std::string_view text);

} // namespace starcensus::photometry
