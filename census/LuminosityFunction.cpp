#include "census/LuminosityFunction.h"

#include "census/Intervals.h"
#include "photometry/base/OptionChecks.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <span>

namespace starcensus::census {

std::optional<LfPopulation> populationOfCategory(photometry::Category category) {
    switch (photometry::classOfCategory(category)) {
    case photometry::StellarClass::WhiteDwarf:
        return LfPopulation::WhiteDwarf;
    case photometry::StellarClass::Evolved:
        return LfPopulation::Evolved;
    case photometry::StellarClass::Unclassified:
        return std::nullopt;
    default:
        return LfPopulation::MainSequence;
    }
}

void validateLuminositySettings(const LuminositySettings& settings) {
    requireInRange("lf-bin-width", settings.bin_width_mag, 0.05, 5.0, "mag");
}

std::vector<LfBin> estimateLuminosityFunction(std::span<const SampleStar> stars, double radius_pc,
                                              const MagnitudeLimits& limits,
                                              double bright_hole_volume_tolerance,
                                              const LuminositySettings& settings) {
    const double width = settings.bin_width_mag;
    const auto [complete_lo, complete_hi] =
        completeAbsGRange(radius_pc, limits, bright_hole_volume_tolerance);
    std::vector<LfBin> table;
    for (std::size_t p = 0; p < kLfPopulationNames.size(); ++p) {
        const auto population = static_cast<LfPopulation>(p);
        // Bin index = floor(M / width): per bin the summed weights and summed weight / V_max, over the
        // bins the settings' M_G range can hold (summed in star order, one pass, no copy of the members);
        // the table keeps those from the brightest to the faintest member.
        const auto range_first = static_cast<long>(std::floor(settings.abs_g_min_mag / width));
        const auto range_count = static_cast<std::size_t>(
            static_cast<long>(std::floor(settings.abs_g_max_mag / width)) - range_first + 1);
        std::vector<double> range_weights(range_count, 0.0), range_density(range_count, 0.0);
        double lowest = std::numeric_limits<double>::infinity();
        double highest = -lowest;
        for (const SampleStar& star : stars) {
            if (populationOfCategory(star.category) != population || !(star.weight > 0.0) ||
                !(star.abs_g_mag >= settings.abs_g_min_mag && star.abs_g_mag < settings.abs_g_max_mag) ||
                !withinLimits(star.abs_g_mag, star.distance_pc, limits)) {
                continue;
            }
            const double v_max = effectiveVolumePc3(star.abs_g_mag, radius_pc, limits);
            if (v_max > 0.0) {
                const double weight = star.weight;
                const auto bin = static_cast<std::size_t>(
                    static_cast<long>(std::floor(star.abs_g_mag / width)) - range_first);
                range_weights[bin] += weight;
                range_density[bin] += weight / v_max;
                lowest = std::min(lowest, star.abs_g_mag);
                highest = std::max(highest, star.abs_g_mag);
            }
        }
        if (!(lowest <= highest)) {
            continue; // no member
        }
        const auto first = static_cast<long>(std::floor(lowest / width));
        const auto count =
            static_cast<std::size_t>(static_cast<long>(std::floor(highest / width)) - first + 1);
        const auto offset = static_cast<std::ptrdiff_t>(first - range_first);
        const std::span<const double> weights(range_weights.data() + offset, count);
        const std::span<const double> weighted_density(range_density.data() + offset, count);
        for (std::size_t b = 0; b < count; ++b) {
            LfBin bin;
            bin.population = population;
            bin.abs_g_lo_mag = static_cast<double>(first + static_cast<long>(b)) * width;
            bin.abs_g_hi_mag = bin.abs_g_lo_mag + width;
            const double centre_volume =
                effectiveVolumePc3(bin.abs_g_lo_mag + 0.5 * width, radius_pc, limits);
            if (!(centre_volume > 0.0)) {
                continue;
            }
            bin.n_weighted = weights[b];
            bin.phi_per_pc3_per_mag = weighted_density[b] / width;
            // Gehrels limits of the count, carried to Phi by the bin's mean 1 / V_max (or, for an empty
            // bin, by the effective volume at its centre).
            const double per_count =
                weights[b] > 0.0 ? bin.phi_per_pc3_per_mag / weights[b] : 1.0 / (centre_volume * width);
            const IntervalSummary interval = poissonInterval(weights[b]);
            bin.phi_lo68 = interval.lo68 * per_count;
            bin.phi_hi68 = interval.hi68 * per_count;
            bin.complete = bin.abs_g_lo_mag >= complete_lo && bin.abs_g_hi_mag <= complete_hi;
            table.push_back(bin);
        }
    }
    return table;
}

} // namespace starcensus::census
