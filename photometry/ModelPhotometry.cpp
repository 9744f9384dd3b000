#include "photometry/ModelPhotometry.h"

#include "photometry/DwarfLocus.h"

#include <algorithm>
#include <array>
#include <cmath>

namespace starcensus::photometry {

namespace {

// The spectral code of the earliest (front) or latest (back) locus row where a quantity is tabulated.
double tabulatedEnd(const DwarfLocus& locus, LocusQuantity quantity, bool earliest) {
    const auto& points = locus.points();
    const auto known = [quantity](const LocusPoint& p) { return !std::isnan(locusValue(p, quantity)); };
    if (earliest) {
        return std::find_if(points.begin(), points.end(), known)->spectral_code;
    }
    return std::find_if(points.rbegin(), points.rend(), known)->spectral_code;
}

// Inverse of the locus with the value clamped into the range the inverse covers, so every value maps
// to a spectral code (the end types beyond the range).
double clampedCode(const DwarfLocus& locus, LocusQuantity quantity, double value) {
    const auto range = locus.invertibleRange(quantity);
    return locus.codeAtValue(quantity, std::clamp(value, range[0], range[1]));
}

// Median M_W2 per subtype, T3V-Y4V (ShippedModelPhotometry in the header): (spectral code, mag).
constexpr std::array<std::array<double, 2>, 10> kLateAbsW2Mag = {{{83.0, 11.78},
                                                                  {84.0, 12.33},
                                                                  {85.0, 12.82},
                                                                  {86.0, 12.83},
                                                                  {87.0, 13.05},
                                                                  {88.0, 13.53},
                                                                  {89.0, 14.00},
                                                                  {90.0, 14.62},
                                                                  {91.0, 15.36},
                                                                  {94.0, 16.92}}};

// The medians, led by the last row with a Ks - W1 colour (code, M_W2).
detail::Curve lateAbsW2Curve(double first_code, double first_abs_w2_mag) {
    detail::Curve curve;
    curve.x.push_back(first_code);
    curve.y.push_back(first_abs_w2_mag);
    for (const auto& [code, abs_w2] : kLateAbsW2Mag) {
        curve.x.push_back(code);
        curve.y.push_back(abs_w2);
    }
    curve.buildIndex();
    return curve;
}

} // namespace

double absHFromJKs(double abs_j_mag, double abs_ks_mag) {
    return abs_ks_mag + 0.3 * (abs_j_mag - abs_ks_mag);
}

ShippedModelPhotometry::ShippedModelPhotometry()
    : locus_(DwarfLocus::shipped()), white_dwarfs_(WhiteDwarfSequence::shipped()),
      first_g_code_(tabulatedEnd(locus_, LocusQuantity::AbsGMag, true)),
      first_colour_code_(tabulatedEnd(locus_, LocusQuantity::BpRpMag, true)),
      first_g_rp_code_(tabulatedEnd(locus_, LocusQuantity::GRpMag, true)),
      last_ks_w1_code_(tabulatedEnd(locus_, LocusQuantity::KsW1Mag, false)) {
    const double last_g_code = tabulatedEnd(locus_, LocusQuantity::AbsGMag, false);
    late_g_minus_j_mag_ = locus_.valueAtCode(LocusQuantity::AbsGMag, last_g_code) -
                          locus_.valueAtCode(LocusQuantity::AbsJMag, last_g_code);
    // From the last Ks - W1 row the medians take over, joined linearly to that row's M_W2.
    const double last_abs_w2 = locus_.valueAtCode(LocusQuantity::AbsKsMag, last_ks_w1_code_) -
                               locus_.valueAtCode(LocusQuantity::KsW1Mag, last_ks_w1_code_) -
                               locus_.valueAtCode(LocusQuantity::W1W2Mag, last_ks_w1_code_);
    late_abs_w2_ = lateAbsW2Curve(last_ks_w1_code_, last_abs_w2);
}

double ShippedModelPhotometry::codeOfMass(double mass_msun) const {
    return clampedCode(locus_, LocusQuantity::MassMsun, mass_msun);
}

double ShippedModelPhotometry::codeOfTeff(double teff_k) const {
    return clampedCode(locus_, LocusQuantity::TeffK, teff_k);
}

double ShippedModelPhotometry::codeOfBpRp(double bp_rp_mag) const {
    return clampedCode(locus_, LocusQuantity::BpRpMag, bp_rp_mag);
}

BandMagnitudes ShippedModelPhotometry::dwarf(double spectral_code) const {
    BandMagnitudes m{};
    m.j = locus_.valueAtCode(LocusQuantity::AbsJMag, spectral_code);
    m.ks = locus_.valueAtCode(LocusQuantity::AbsKsMag, spectral_code);
    m.h = absHFromJKs(m.j, m.ks);
    m.g = locus_.valueAtCode(LocusQuantity::AbsGMag, spectral_code);
    if (std::isnan(m.g)) {
        m.g = spectral_code < first_g_code_ ? locus_.valueAtCode(LocusQuantity::AbsVMag, spectral_code)
                                            : m.j + late_g_minus_j_mag_;
    }
    const double bp_rp =
        locus_.valueAtCode(LocusQuantity::BpRpMag, std::max(spectral_code, first_colour_code_));
    const double g_rp = locus_.valueAtCode(LocusQuantity::GRpMag, std::max(spectral_code, first_g_rp_code_));
    m.rp = m.g - g_rp;
    m.bp = m.rp + bp_rp;
    m.v = locus_.valueAtCode(LocusQuantity::AbsVMag, spectral_code);
    m.b = m.v + locus_.valueAtCode(LocusQuantity::BVMag, spectral_code);
    const double w1_w2 = locus_.valueAtCode(LocusQuantity::W1W2Mag, spectral_code);
    if (spectral_code <= last_ks_w1_code_) {
        m.w1 = m.ks - locus_.valueAtCode(LocusQuantity::KsW1Mag, spectral_code);
        m.w2 = m.w1 - w1_w2;
    } else {
        m.w2 = late_abs_w2_.at(spectral_code);
        m.w1 = m.w2 + w1_w2;
    }
    return m;
}

BandMagnitudes ShippedModelPhotometry::whiteDwarf(double cooling_age_yr, double log_g,
                                                  WhiteDwarfAtmosphere atmosphere) const {
    const auto model = white_dwarfs_.atCoolingAge(cooling_age_yr, log_g, atmosphere);
    constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    return {model.abs_g_mag, model.abs_bp_mag, model.abs_rp_mag, kNaN, kNaN, kNaN};
}

const ModelPhotometry& shippedModelPhotometry() {
    static const ShippedModelPhotometry photometry;
    return photometry;
}

double brownDwarfTeffK(double mass_msun, double age_gyr) {
    return 1550.0 * std::pow(mass_msun / 0.05, 0.83) * std::pow(age_gyr, -0.32);
}

} // namespace starcensus::photometry
