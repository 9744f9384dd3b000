#pragma once
// Measurement-error laws of the mock catalog, as functions of the source's G magnitude (Gaia) or band
// magnitude (2MASS). All anchors are from memory and marked so in MeasurementErrors.cpp. Between anchors the
// error is interpolated linearly in log10(error); brighter than the first anchor it is held constant,
// fainter than the last it continues the last segment's slope.
namespace starcensus::census::mock {

/// 1-sigma parallax error (mas) at G (mag): Gaia EDR3 (Lindegren et al. 2021, A&A 649, A2; Gaia EDR3
/// release summary): 0.025 mas at G <= 15, 0.07 at G = 17, 0.5 at G = 20, 1.3 at G = 21 (from memory).
double parallaxErrorMas(double g_mag);
/// 1-sigma proper-motion error per component (mas/yr): 0.025 at G <= 15, 0.07 at 17, 0.5 at 20, 1.4 at
/// 21 (Gaia EDR3 release summary; from memory).
double properMotionErrorMasPerYr(double g_mag);
/// 1-sigma G, G_BP, G_RP errors (mag) at G: 0.3, 0.9, 0.6 mmag at G <= 13; 1, 12, 6 mmag at G = 17; 6,
/// 108, 52 mmag at G = 20 (Gaia EDR3 release summary, Riello et al. 2021, A&A 649, A3; from memory).
double gMagErrorMag(double g_mag);
double bpMagErrorMag(double g_mag);
double rpMagErrorMag(double g_mag);
/// 1-sigma 2MASS error (mag) at magnitude `mag` in a band whose 10-sigma limit is `limit_mag`:
/// sqrt(0.02^2 + (0.1 * 10^(0.4 (mag - limit)))^2), i.e. a 0.02 mag floor and background-limited noise
/// reaching S/N = 10 at the limit (limits J 15.8, H 15.1, Ks 14.3 of Skrutskie et al. 2006, AJ 131,
/// 1163, and the floor are from memory).
double twoMassErrorMag(double mag, double limit_mag);
/// 1-sigma WISE W1/W2 error (mag) at magnitude `mag` in a band whose 5-sigma limit is `limit_mag`:
/// sqrt(0.015^2 + (0.2 * 10^(0.4 (mag - limit)))^2), the AllWISE-like floor and S/N = 5 at the limit
/// (from memory).
double wiseErrorMag(double mag, double limit_mag);
/// The law of both: sqrt(floor^2 + (error_at_limit * 10^(0.4 (mag - limit)))^2) (mag).
double backgroundLimitedErrorMag(double mag, double limit_mag, double error_at_limit_mag, double floor_mag);
/// Probability that G_BP and G_RP are missing at G: 0 at G <= start, rising linearly to 1 at G >= end
/// (common practice, no source).
double bpRpLossProbability(double g_mag, double start_g_mag, double end_g_mag);

} // namespace starcensus::census::mock
