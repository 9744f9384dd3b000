#include "census/InitialMassFunction.h"

#include "photometry/base/OptionChecks.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

namespace starcensus::census {

std::string imfFamilyName(ImfFamily family) {
    return family == ImfFamily::Kroupa2001 ? "kroupa" : "chabrier";
}

void validateImfSettings(const ImfSettings& s) {
    requireInRange("imf-mass-min", s.mass_min_msun, 0.0, 1.0, "Msun", LowerBound::Exclusive);
    requireInRange("imf-mass-max", s.mass_max_msun, 0.1, 1000.0, "Msun");
    requireThat(s.mass_min_msun < s.mass_max_msun, "imf-mass-min",
                "must be below --imf-mass-max (" + std::to_string(s.mass_max_msun) + " Msun)");
    requireInRange("imf-alpha-low", s.kroupa_alpha_low, -3.0, 5.0, "");
    requireInRange("imf-alpha-mid", s.kroupa_alpha_mid, -3.0, 5.0, "");
    requireInRange("imf-alpha-high", s.kroupa_alpha_high, -3.0, 5.0, "");
    requireInRange("imf-break-low", s.kroupa_break_low_msun, 0.0, 10.0, "Msun", LowerBound::Exclusive);
    requireInRange("imf-break-high", s.kroupa_break_high_msun, 0.0, 10.0, "Msun", LowerBound::Exclusive);
    requireThat(s.kroupa_break_low_msun < s.kroupa_break_high_msun, "imf-break-low",
                "must be below --imf-break-high (" + std::to_string(s.kroupa_break_high_msun) + " Msun)");
    requireInRange("imf-peak-mass", s.chabrier_peak_mass_msun, 0.0, 10.0, "Msun", LowerBound::Exclusive);
    requireInRange("imf-sigma", s.chabrier_sigma_dex, 0.0, 3.0, "dex", LowerBound::Exclusive);
    requireInRange("imf-join", s.chabrier_join_msun, 0.0, 100.0, "Msun", LowerBound::Exclusive);
    requireInRange("imf-x-high", s.chabrier_x_high, -3.0, 5.0, "");
}

InitialMassFunction::InitialMassFunction(const ImfSettings& settings) : settings_(settings) {
    validateImfSettings(settings);
    constexpr double kInfinity = std::numeric_limits<double>::infinity();
    std::vector<Piece> unclipped;
    if (settings.family == ImfFamily::Kroupa2001) {
        // Continuity at each break b: c_next = c * b^(alpha_next - alpha).
        const double c_mid =
            std::pow(settings.kroupa_break_low_msun, settings.kroupa_alpha_mid - settings.kroupa_alpha_low);
        const double c_high = c_mid * std::pow(settings.kroupa_break_high_msun,
                                               settings.kroupa_alpha_high - settings.kroupa_alpha_mid);
        unclipped.push_back({false, 0.0, settings.kroupa_break_low_msun, 1.0, settings.kroupa_alpha_low});
        unclipped.push_back({false, settings.kroupa_break_low_msun, settings.kroupa_break_high_msun, c_mid,
                             settings.kroupa_alpha_mid});
        unclipped.push_back(
            {false, settings.kroupa_break_high_msun, kInfinity, c_high, settings.kroupa_alpha_high});
    } else {
        Piece log_normal{true, 0.0, settings.chabrier_join_msun, 1.0, 0.0};
        log_normal.mu = std::log10(settings.chabrier_peak_mass_msun);
        log_normal.sigma = settings.chabrier_sigma_dex;
        // Above the join: dN/dlog10 m = B m^-x, i.e. dN/dm = (B / ln 10) m^-(x+1), with B set by continuity.
        const double z = (std::log10(settings.chabrier_join_msun) - log_normal.mu) / log_normal.sigma;
        const double b =
            std::exp(-0.5 * z * z) * std::pow(settings.chabrier_join_msun, settings.chabrier_x_high);
        unclipped.push_back(log_normal);
        unclipped.push_back({false, settings.chabrier_join_msun, kInfinity, b / std::numbers::ln10,
                             settings.chabrier_x_high + 1.0});
    }
    total_ = 0.0;
    for (Piece piece : unclipped) {
        piece.low = std::max(piece.low, settings.mass_min_msun);
        piece.high = std::min(piece.high, settings.mass_max_msun);
        if (piece.low < piece.high) {
            piece.ln_low = std::log(piece.low);
            piece.ln_high = std::log(piece.high);
            piece.primitive_low = primitive(piece, piece.ln_low);
            piece.integral = primitive(piece, piece.ln_high) - piece.primitive_low;
            total_ += piece.integral;
            pieces_.push_back(piece);
        }
    }
    double running = 0.0;
    for (const Piece& piece : pieces_) {
        running += piece.integral / total_;
        cumulative_.push_back(running);
    }
    cumulative_.back() = 1.0;
}

double InitialMassFunction::primitive(const Piece& piece, double ln_mass) {
    if (piece.log_normal) {
        // ∫ A exp(-(l-mu)^2 / 2 sigma^2) dl over l = log10 m.
        const double scale = piece.sigma * std::numbers::sqrt2;
        return piece.coefficient * piece.sigma * std::sqrt(std::numbers::pi / 2.0) *
               std::erf((ln_mass / std::numbers::ln10 - piece.mu) / scale);
    }
    const double power = 1.0 - piece.slope;
    if (std::abs(power) < 1e-12) {
        return piece.coefficient * ln_mass;
    }
    return piece.coefficient * std::exp(power * ln_mass) / power;
}

double InitialMassFunction::integrate(const Piece& piece, double low, double high) {
    return primitive(piece, std::log(high)) - primitive(piece, std::log(low));
}

double InitialMassFunction::densityOf(const Piece& piece, double mass_msun) {
    if (piece.log_normal) {
        const double z = (std::log10(mass_msun) - piece.mu) / piece.sigma;
        return piece.coefficient * std::exp(-0.5 * z * z) / (mass_msun * std::numbers::ln10);
    }
    return piece.coefficient * std::pow(mass_msun, -piece.slope);
}

double InitialMassFunction::density(double mass_msun) const {
    for (const Piece& piece : pieces_) {
        if (mass_msun >= piece.low && mass_msun <= piece.high) {
            return densityOf(piece, mass_msun) / total_;
        }
    }
    return 0.0;
}

double InitialMassFunction::fractionBetween(double low_msun, double high_msun) const {
    double sum = 0.0;
    for (const Piece& piece : pieces_) {
        const double low = std::max(low_msun, piece.low);
        const double high = std::min(high_msun, piece.high);
        if (low < high) {
            sum += integrate(piece, low, high);
        }
    }
    return sum / total_;
}

double InitialMassFunction::fractionBelowLn(double ln_mass_msun) const {
    double sum = 0.0;
    for (const Piece& piece : pieces_) {
        if (ln_mass_msun >= piece.ln_high) {
            sum += piece.integral;
        } else if (ln_mass_msun > piece.ln_low) {
            sum += primitive(piece, ln_mass_msun) - piece.primitive_low;
        }
    }
    return sum / total_;
}

double InitialMassFunction::sample(Xoshiro256& random) const {
    const double u = random.uniform();
    const auto chosen = std::upper_bound(cumulative_.begin(), cumulative_.end(), u);
    const Piece& piece = pieces_[std::min<std::size_t>(static_cast<std::size_t>(chosen - cumulative_.begin()),
                                                       pieces_.size() - 1)];
    if (piece.log_normal) {
        // A normal in log10 m, truncated to the piece: rejection is exact and cheap for the default
        // range (acceptance ~0.85).
        const double log_low = std::log10(piece.low);
        const double log_high = std::log10(piece.high);
        while (true) {
            const double log_mass = piece.mu + piece.sigma * random.normal();
            if (log_mass >= log_low && log_mass <= log_high) {
                return std::pow(10.0, log_mass);
            }
        }
    }
    const double v = random.uniform();
    const double power = 1.0 - piece.slope;
    if (std::abs(power) < 1e-12) {
        return piece.low * std::pow(piece.high / piece.low, v);
    }
    const double a = std::pow(piece.low, power);
    const double b = std::pow(piece.high, power);
    return std::pow(a + v * (b - a), 1.0 / power);
}

} // namespace starcensus::census
