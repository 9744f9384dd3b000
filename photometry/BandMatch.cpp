#include "photometry/BandMatch.h"

#include "photometry/Curve.h"
#include "photometry/StellarClass.h"
#include "photometry/base/DataFiles.h"
#include "photometry/base/InputError.h"
#include "photometry/base/TextTable.h"

#include <algorithm>
#include <cmath>

namespace starcensus::photometry {

namespace {
constexpr double kGridStepsPerSubtype = 10.0; // grid of 0.1 subtype
constexpr double kGridStep = 1.0 / kGridStepsPerSubtype;
constexpr double kFirstUltracoolWiseCode = 66.0; // M6V: the Dupuy & Liu 2012 relations start here
constexpr double kFirstMCode = 60.0;
constexpr double kFirstLCode = 70.0;
constexpr double kFirstYCode = 90.0;
constexpr std::size_t index(MatchBand band) {
    return static_cast<std::size_t>(band);
}
} // namespace

int BandMatchInput::bandCount() const {
    return static_cast<int>(
        std::count_if(abs_mag.begin(), abs_mag.end(), [](double m) { return !std::isnan(m); }));
}

UltracoolWiseRelations UltracoolWiseRelations::load(const std::string& path) {
    const auto table = TextTable::read(path);
    const std::size_t type_column = table.column("spectral_type");
    UltracoolWiseRelations relations;
    relations.abs_w1_mag = table.numbers("abs_w1_mag");
    relations.abs_w2_mag = table.numbers("abs_w2_mag");
    for (std::size_t row = 0; row < table.rowCount(); ++row) {
        const std::string& type = table.text(row, type_column);
        const auto code = parseSpectralType(type);
        if (!code || (row > 0 && !(*code > relations.spectral_code.back()))) {
            throw InputError(path + ": spectral_type '" + type +
                             "' is not a dwarf type later than the row before");
        }
        relations.spectral_code.push_back(*code);
    }
    return relations;
}

const UltracoolWiseRelations& UltracoolWiseRelations::shipped() {
    static const UltracoolWiseRelations relations =
        load(dataFilePath("ultracool_wise_absolute_magnitudes.txt"));
    return relations;
}

BandMatcher::BandMatcher(const DwarfLocus& locus, const UltracoolWiseRelations& wise,
                         BandMatchSettings settings)
    : settings_(settings), first_code_(locus.points().front().spectral_code) {
    const detail::Curve wise_w1 = detail::runningMaximumCurve(wise.spectral_code, wise.abs_w1_mag);
    const detail::Curve wise_w2 = detail::runningMaximumCurve(wise.spectral_code, wise.abs_w2_mag);
    const double last_code = std::max(locus.points().back().spectral_code, wise.spectral_code.back());
    const auto steps = static_cast<std::size_t>(std::lround((last_code - first_code_) / kGridStep));
    for (std::size_t step = 0; step <= steps; ++step) {
        const double code = gridCode(step);
        const auto at = [&](LocusQuantity quantity) { return locus.valueAtCode(quantity, code); };
        std::array<double, kMatchBandCount> abs_mag{};
        abs_mag[index(MatchBand::V)] = at(LocusQuantity::AbsVMag);
        abs_mag[index(MatchBand::B)] = at(LocusQuantity::AbsVMag) + at(LocusQuantity::BVMag);
        abs_mag[index(MatchBand::J)] = at(LocusQuantity::AbsJMag);
        abs_mag[index(MatchBand::H)] = at(LocusQuantity::AbsJMag) - at(LocusQuantity::JHMag);
        abs_mag[index(MatchBand::Ks)] = at(LocusQuantity::AbsKsMag);
        if (code < kFirstUltracoolWiseCode) {
            abs_mag[index(MatchBand::W1)] = at(LocusQuantity::AbsKsMag) - at(LocusQuantity::KsW1Mag);
            abs_mag[index(MatchBand::W2)] = abs_mag[index(MatchBand::W1)] - at(LocusQuantity::W1W2Mag);
        } else {
            abs_mag[index(MatchBand::W1)] = wise_w1.at(code);
            abs_mag[index(MatchBand::W2)] = wise_w2.at(code);
        }
        relation_abs_mag_.push_back(abs_mag);
        colour_regime_.push_back(code < kFirstMCode ? 0 : code < kFirstLCode ? 1 : 2);
        const double luminosity_scatter =
            code < kFirstYCode ? settings_.luminosity_scatter_mag : settings_.luminosity_scatter_y_mag;
        luminosity_variance_mag2_.push_back(luminosity_scatter * luminosity_scatter);
    }
}

const BandMatcher& BandMatcher::shipped() {
    static const BandMatcher matcher(DwarfLocus::shipped(), UltracoolWiseRelations::shipped());
    return matcher;
}

double BandMatcher::gridCode(std::size_t index) const {
    // Whole tenths of a subtype, so that floor() of a code (its census category) is never off by rounding.
    return (std::round(first_code_ * kGridStepsPerSubtype) + static_cast<double>(index)) /
           kGridStepsPerSubtype;
}

std::size_t BandMatcher::gridIndex(double spectral_code) const {
    const double steps = std::round((spectral_code - first_code_) / kGridStep);
    return static_cast<std::size_t>(
        std::clamp(steps, 0.0, static_cast<double>(relation_abs_mag_.size() - 1)));
}

double BandMatcher::relationAbsMag(MatchBand band, double spectral_code) const {
    return relation_abs_mag_[gridIndex(spectral_code)][index(band)];
}

BandMatchResult BandMatcher::match(const BandMatchInput& input) const {
    BandMatchResult result;
    // 1 / (sigma_b^2 + sigma_colour^2) per colour regime (O-K, M, L-Y) and band.
    const std::array<double, 3> colour_scatter = {settings_.colour_scatter_star_mag,
                                                  settings_.colour_scatter_m_mag,
                                                  settings_.colour_scatter_ultracool_mag};
    std::array<std::array<double, kMatchBandCount>, 3> inverse_variance{};
    std::array<std::size_t, kMatchBandCount> present_bands{};
    int present = 0;
    for (std::size_t b = 0; b < kMatchBandCount; ++b) {
        if (!std::isnan(input.abs_mag[b])) {
            present_bands[static_cast<std::size_t>(present++)] = b;
            const double error =
                std::isnan(input.error_mag[b]) ? settings_.missing_error_mag : input.error_mag[b];
            for (std::size_t regime = 0; regime < colour_scatter.size(); ++regime) {
                inverse_variance[regime][b] =
                    1.0 / (error * error + colour_scatter[regime] * colour_scatter[regime]);
            }
        }
    }
    if (present == 0) {
        return result;
    }
    const double modulus_variance = input.modulus_error_mag * input.modulus_error_mag;
    std::vector<double> chi_squared(relation_abs_mag_.size(), std::numeric_limits<double>::infinity());
    std::size_t best = relation_abs_mag_.size();
    for (std::size_t i = 0; i < relation_abs_mag_.size(); ++i) {
        // Sherman-Morrison: with D = diag(d_b) and C = D + s 1 1^T,
        // r^T C^-1 r = sum r_b^2/d_b - s (sum r_b/d_b)^2 / (1 + s sum 1/d_b).
        double weighted_square = 0.0, weighted_sum = 0.0, weight = 0.0;
        int covered = 0;
        for (int k = 0; k < present; ++k) {
            const std::size_t b = present_bands[static_cast<std::size_t>(k)];
            const double relation = relation_abs_mag_[i][b];
            if (std::isnan(relation)) {
                continue;
            }
            ++covered;
            const double residual = input.abs_mag[b] - relation;
            const double inverse = inverse_variance[colour_regime_[i]][b];
            weighted_square += residual * residual * inverse;
            weighted_sum += residual * inverse;
            weight += inverse;
        }
        if (covered < std::min(present, 2)) {
            continue; // a colour (two bands) at least, so that no code wins by what it leaves unmodelled
        }
        const double common = modulus_variance + luminosity_variance_mag2_[i];
        chi_squared[i] = weighted_square - common * weighted_sum * weighted_sum / (1.0 + common * weight) +
                         static_cast<double>(present - covered);
        if (best == relation_abs_mag_.size() || chi_squared[i] < chi_squared[best]) {
            best = i; // ties keep the earlier code
        }
    }
    if (best == relation_abs_mag_.size()) {
        return result;
    }
    const double limit = chi_squared[best] + 1.0;
    std::size_t low = best, high = best;
    while (low > 0 && chi_squared[low - 1] <= limit) {
        --low;
    }
    while (high + 1 < chi_squared.size() && chi_squared[high + 1] <= limit) {
        ++high;
    }
    result.grid_code = gridCode(best);
    result.spectral_code = std::round(result.grid_code * 2.0) / 2.0; // nearest half subtype (see header)
    result.chi_squared = chi_squared[best];
    result.code_low = gridCode(low);
    result.code_high = gridCode(high);
    for (std::size_t b = 0; b < kMatchBandCount; ++b) {
        result.bands += !std::isnan(input.abs_mag[b]) && !std::isnan(relation_abs_mag_[best][b]) ? 1 : 0;
    }
    return result;
}

} // namespace starcensus::photometry
