#include "census/mock/MeasurementErrors.h"

#include <algorithm>
#include <array>
#include <cmath>

namespace starcensus::census::mock {

namespace {

struct Anchor {
    double g_mag;
    double error;
};

// log10(error) piecewise linear in G through the anchors (sorted by G).
template <std::size_t N>
double logLinear(const std::array<Anchor, N>& anchors, double g_mag) {
    if (g_mag <= anchors.front().g_mag) {
        return anchors.front().error;
    }
    std::size_t i = 1;
    while (i + 1 < N && g_mag > anchors[i].g_mag) {
        ++i;
    }
    const Anchor& a = anchors[i - 1];
    const Anchor& b = anchors[i];
    const double t = (g_mag - a.g_mag) / (b.g_mag - a.g_mag);
    return std::pow(10.0, std::log10(a.error) + t * (std::log10(b.error) - std::log10(a.error)));
}

// Gaia EDR3 release summary and Lindegren et al. 2021 (A&A 649, A2); from memory. 0.025 mas is the
// middle of the quoted 0.02-0.03 mas for G < 15.
constexpr std::array<Anchor, 4> kParallaxMas{{{15.0, 0.025}, {17.0, 0.07}, {20.0, 0.5}, {21.0, 1.3}}};
constexpr std::array<Anchor, 4> kProperMotionMasPerYr{
    {{15.0, 0.025}, {17.0, 0.07}, {20.0, 0.5}, {21.0, 1.4}}};
// Gaia EDR3 release summary (Riello et al. 2021, A&A 649, A3); from memory.
constexpr std::array<Anchor, 3> kGMag{{{13.0, 0.0003}, {17.0, 0.001}, {20.0, 0.006}}};
constexpr std::array<Anchor, 3> kBpMag{{{13.0, 0.0009}, {17.0, 0.012}, {20.0, 0.108}}};
constexpr std::array<Anchor, 3> kRpMag{{{13.0, 0.0006}, {17.0, 0.006}, {20.0, 0.052}}};

} // namespace

double parallaxErrorMas(double g_mag) {
    return logLinear(kParallaxMas, g_mag);
}
double properMotionErrorMasPerYr(double g_mag) {
    return logLinear(kProperMotionMasPerYr, g_mag);
}
double gMagErrorMag(double g_mag) {
    return logLinear(kGMag, g_mag);
}
double bpMagErrorMag(double g_mag) {
    return logLinear(kBpMag, g_mag);
}
double rpMagErrorMag(double g_mag) {
    return logLinear(kRpMag, g_mag);
}

double backgroundLimitedErrorMag(double mag, double limit_mag, double error_at_limit_mag, double floor_mag) {
    const double background = error_at_limit_mag * std::pow(10.0, 0.4 * (mag - limit_mag));
    return std::hypot(floor_mag, background);
}

double twoMassErrorMag(double mag, double limit_mag) {
    return backgroundLimitedErrorMag(mag, limit_mag, 0.1, 0.02);
}

double wiseErrorMag(double mag, double limit_mag) {
    return backgroundLimitedErrorMag(mag, limit_mag, 0.2, 0.015);
}

double bpRpLossProbability(double g_mag, double start_g_mag, double end_g_mag) {
    return std::clamp((g_mag - start_g_mag) / (end_g_mag - start_g_mag), 0.0, 1.0);
}

} // namespace starcensus::census::mock
