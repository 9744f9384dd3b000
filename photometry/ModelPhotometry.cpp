#include "photometry/ModelPhotometry.h"

#include "photometry/DwarfLocus.h"

#include <algorithm>
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

} // namespace

double absHFromJKs(double abs_j_mag, double abs_ks_mag) {
    return abs_ks_mag + 0.3 * (abs_j_mag - abs_ks_mag);
}

ShippedModelPhotometry::ShippedModelPhotometry()
    : locus_(DwarfLocus::shipped()), white_dwarfs_(WhiteDwarfSequence::shipped()),
      first_g_code_(tabulatedEnd(locus_, LocusQuantity::AbsGMag, true)),
      first_colour_code_(tabulatedEnd(locus_, LocusQuantity::BpRpMag, true)),
      first_g_rp_code_(tabulatedEnd(locus_, LocusQuantity::GRpMag, true)) {
    const double last_g_code = tabulatedEnd(locus_, LocusQuantity::AbsGMag, false);
    late_g_minus_j_mag_ = locus_.valueAtCode(LocusQuantity::AbsGMag, last_g_code) -
                          locus_.valueAtCode(LocusQuantity::AbsJMag, last_g_code);
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
