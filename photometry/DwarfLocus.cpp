#include "photometry/DwarfLocus.h"

#include "photometry/StellarClass.h"
#include "photometry/base/DataFiles.h"
#include "photometry/base/InputError.h"
#include "photometry/base/TextTable.h"

#include <algorithm>
#include <cmath>

namespace starcensus::photometry {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t index(LocusQuantity quantity) {
    return static_cast<std::size_t>(quantity);
}
} // namespace

double locusValue(const LocusPoint& point, LocusQuantity quantity) {
    switch (quantity) {
    case LocusQuantity::TeffK:
        return point.teff_k;
    case LocusQuantity::AbsGMag:
        return point.abs_g_mag;
    case LocusQuantity::BpRpMag:
        return point.bp_rp_mag;
    case LocusQuantity::GRpMag:
        return point.g_rp_mag;
    case LocusQuantity::AbsJMag:
        return point.abs_j_mag;
    case LocusQuantity::AbsKsMag:
        return point.abs_ks_mag;
    case LocusQuantity::JKsMag:
        return point.abs_j_mag - point.abs_ks_mag;
    case LocusQuantity::MassMsun:
        return point.mass_msun;
    case LocusQuantity::AbsVMag:
        return point.abs_v_mag;
    case LocusQuantity::LogLLsun:
        return point.log_l_lsun;
    case LocusQuantity::RadiusRsun:
        return point.radius_rsun;
    case LocusQuantity::W1W2Mag:
        return point.w1_w2_mag;
    case LocusQuantity::VKsMag:
        return point.abs_v_mag - point.abs_ks_mag;
    case LocusQuantity::BVMag:
        return point.b_v_mag;
    case LocusQuantity::JHMag:
        return point.j_h_mag;
    case LocusQuantity::KsW1Mag:
        return point.ks_w1_mag;
    }
    return kNaN;
}

DwarfLocus DwarfLocus::load(const std::string& path) {
    const auto table = TextTable::read(path);
    const std::size_t type_column = table.column("spectral_type");
    const auto teff = table.numbers("teff_k");
    const auto abs_g = table.numbers("abs_g_mag");
    const auto bp_rp = table.numbers("bp_rp_mag");
    const auto g_rp = table.numbers("g_rp_mag");
    const auto abs_j = table.numbers("abs_j_mag");
    const auto abs_ks = table.numbers("abs_ks_mag");
    const auto mass = table.numbers("mass_msun");
    const auto abs_v = table.numbers("abs_v_mag");
    const auto log_l = table.numbers("log_l_lsun");
    const auto radius = table.numbers("radius_rsun");
    const auto w1_w2 = table.numbers("w1_w2_mag");
    const auto b_v = table.numbers("b_v_mag");
    const auto j_h = table.numbers("j_h_mag");
    const auto ks_w1 = table.numbers("ks_w1_mag");
    std::vector<LocusPoint> points;
    for (std::size_t row = 0; row < table.rowCount(); ++row) {
        const std::string& type = table.text(row, type_column);
        const auto code = parseSpectralType(type);
        if (!code) {
            throw InputError(path + ": spectral_type '" + type + "' is not a dwarf spectral type");
        }
        points.push_back({type, *code, teff[row], abs_g[row], bp_rp[row], g_rp[row], abs_j[row], abs_ks[row],
                          mass[row], abs_v[row], log_l[row], radius[row], w1_w2[row], b_v[row], j_h[row],
                          ks_w1[row]});
    }
    return DwarfLocus(std::move(points));
}

const DwarfLocus& DwarfLocus::shipped() {
    static const DwarfLocus locus = load(dataFilePath("dwarf_locus_pecaut_mamajek.txt"));
    return locus;
}

DwarfLocus::DwarfLocus(std::vector<LocusPoint> points) : points_(std::move(points)) {
    std::sort(points_.begin(), points_.end(),
              [](const LocusPoint& a, const LocusPoint& b) { return a.spectral_code < b.spectral_code; });
    for (std::size_t i = 0; i < points_.size(); ++i) {
        if (std::isnan(points_[i].spectral_code) ||
            (i > 0 && points_[i].spectral_code == points_[i - 1].spectral_code)) {
            throw InputError("dwarf locus: spectral code of '" + points_[i].spectral_type +
                             "' is missing or repeated");
        }
    }
    std::vector<double> codes;
    for (const auto& point : points_) {
        codes.push_back(point.spectral_code);
    }
    for (std::size_t q = 0; q < kLocusQuantityCount; ++q) {
        std::vector<double> values;
        for (const auto& point : points_) {
            values.push_back(locusValue(point, static_cast<LocusQuantity>(q)));
        }
        by_code_[q] = detail::runningMaximumCurve(codes, values);
        // A quantity's direction along the sequence is the sign of (last - first) known value.
        const auto first =
            std::find_if(values.begin(), values.end(), [](double v) { return !std::isnan(v); });
        const auto last =
            std::find_if(values.rbegin(), values.rend(), [](double v) { return !std::isnan(v); });
        direction_[q] = (first != values.end() && *last < *first) ? -1.0 : 1.0;
        for (double& value : values) {
            value *= direction_[q];
        }
        inverse_[q] = detail::runningMaximumCurve(values, codes);
    }
}

LocusPoint DwarfLocus::atCode(double spectral_code) const {
    const auto at = [&](LocusQuantity q) { return valueAtCode(q, spectral_code); };
    return {std::isnan(spectral_code) ? std::string() : spectralTypeLabel(spectral_code),
            spectral_code,
            at(LocusQuantity::TeffK),
            at(LocusQuantity::AbsGMag),
            at(LocusQuantity::BpRpMag),
            at(LocusQuantity::GRpMag),
            at(LocusQuantity::AbsJMag),
            at(LocusQuantity::AbsKsMag),
            at(LocusQuantity::MassMsun),
            at(LocusQuantity::AbsVMag),
            at(LocusQuantity::LogLLsun),
            at(LocusQuantity::RadiusRsun),
            at(LocusQuantity::W1W2Mag),
            at(LocusQuantity::BVMag),
            at(LocusQuantity::JHMag),
            at(LocusQuantity::KsW1Mag)};
}

double DwarfLocus::valueAtCode(LocusQuantity quantity, double spectral_code) const {
    return by_code_[index(quantity)].at(spectral_code);
}

double DwarfLocus::codeAtValue(LocusQuantity quantity, double value) const {
    return inverse_[index(quantity)].at(direction_[index(quantity)] * value);
}

std::array<double, 2> DwarfLocus::invertibleRange(LocusQuantity quantity) const {
    const auto& curve = inverse_[index(quantity)];
    if (curve.empty()) {
        return {kNaN, kNaN};
    }
    const double d = direction_[index(quantity)];
    const double a = d * curve.x.front();
    const double b = d * curve.x.back();
    return {std::min(a, b), std::max(a, b)};
}

} // namespace starcensus::photometry
