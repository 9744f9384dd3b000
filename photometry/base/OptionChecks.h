#pragma once
// Range checks for settings that come from command-line options: a value outside its range is an
// InputError naming the option, the value and the allowed range.
#include "photometry/base/InputError.h"

#include <cmath>
#include <cstdio>
#include <sstream>
#include <string>

namespace starcensus {

/// A number for a message or a help text as printf's %g writes it: "10", "0.5", "1e+06", not
/// std::to_string's "10.000000".
inline std::string numberText(double value) {
    char text[32];
    std::snprintf(text, sizeof text, "%g", value);
    return text;
}

enum class LowerBound { Inclusive, Exclusive };

/// Throws InputError("--option: VALUE is outside the allowed range [low, high] UNIT") unless low <= value
/// <= high (low < value with LowerBound::Exclusive). NaN is always rejected.
inline void requireInRange(const std::string& option, double value, double low, double high,
                           const std::string& unit, LowerBound lower = LowerBound::Inclusive) {
    const bool above_low = lower == LowerBound::Exclusive ? value > low : value >= low;
    if (std::isnan(value) || !above_low || value > high) {
        std::ostringstream message;
        message << "--" << option << ": " << value << " is outside the allowed range "
                << (lower == LowerBound::Exclusive ? "(" : "[") << low << ", " << high << "]";
        if (!unit.empty()) {
            message << " " << unit;
        }
        throw InputError(message.str());
    }
}

/// Throws InputError("--option: ...") when a relation between two settings does not hold.
inline void requireThat(bool condition, const std::string& option, const std::string& what) {
    if (!condition) {
        throw InputError("--" + option + ": " + what);
    }
}

} // namespace starcensus
