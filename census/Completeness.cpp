#include "census/Completeness.h"

#include "census/Fractions.h"
#include "photometry/base/OptionChecks.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

namespace starcensus::census {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double distanceModulus(double distance_pc) {
    return 5.0 * std::log10(distance_pc / 10.0);
}

// The inner (bright-limit) and outer (faint-limit or radius) distances of a star's visible shell.
std::array<double, 2> visibleShellPc(double abs_g_mag, double radius_pc, const MagnitudeLimits& limits) {
    return {std::min(radius_pc, limitingDistancePc(limits.bright_g_mag, abs_g_mag)),
            std::min(radius_pc, limitingDistancePc(limits.faint_g_mag, abs_g_mag))};
}

// Kolmogorov-Smirnov statistic sqrt(N) D of the distances inside radius_pc against (d / r)^3 uniform:
// D = max_i max((i + 1) / N - u_i, u_i - i / N) with u_i = d_i^3 / r^3. `distances` must be sorted.
double ksUniformVolume(std::span<const double> distances, double radius_pc) {
    const double n = static_cast<double>(distances.size());
    const double inverse_volume = 1.0 / (radius_pc * radius_pc * radius_pc);
    double d = 0.0;
    for (std::size_t i = 0; i < distances.size(); ++i) {
        const double u = distances[i] * distances[i] * distances[i] * inverse_volume;
        d = std::max({d, (static_cast<double>(i) + 1.0) / n - u, u - static_cast<double>(i) / n});
    }
    return std::sqrt(n) * d;
}

std::string subtypeName(std::size_t category) {
    const std::string label = photometry::spectralTypeLabel(static_cast<double>(category));
    return label.substr(0, label.find('.')); // "M5.0V" -> "M5"
}

} // namespace

void validateCompletenessSettings(const CompletenessSettings& s) {
    requireInRange("faint-limit", s.faint_limit_g_mag, 5.0, 30.0, "mag");
    requireInRange("bright-limit", s.bright_limit_g_mag, -5.0, 20.0, "mag");
    requireThat(s.bright_limit_g_mag < s.faint_limit_g_mag, "bright-limit", "must be below --faint-limit");
    requireInRange("turnover-bin", s.histogram_bin_mag, 0.01, 1.0, "mag");
}

double limitingDistancePc(double apparent_limit_mag, double abs_g_mag) {
    return std::pow(10.0, 0.2 * (apparent_limit_mag - abs_g_mag) + 1.0);
}

double effectiveVolumePc3(double abs_g_mag, double radius_pc, const MagnitudeLimits& limits) {
    const auto [inner, outer] = visibleShellPc(abs_g_mag, radius_pc, limits);
    return sphereVolumePc3(outer) - sphereVolumePc3(inner);
}

bool withinLimits(double abs_g_mag, double distance_pc, const MagnitudeLimits& limits) {
    const double apparent = abs_g_mag + distanceModulus(distance_pc);
    return apparent >= limits.bright_g_mag && apparent <= limits.faint_g_mag;
}

std::array<double, 2> completeAbsGRange(double radius_pc, const MagnitudeLimits& limits,
                                        double bright_hole_volume_tolerance) {
    // The inner hole d_min^3 <= tolerance R^3, i.e. d_min <= tolerance^(1/3) R.
    const double hole_radius_pc = std::cbrt(bright_hole_volume_tolerance) * radius_pc;
    return {limits.bright_g_mag - distanceModulus(hole_radius_pc),
            limits.faint_g_mag - distanceModulus(radius_pc)};
}

double estimateFaintLimitMag(std::span<const double> g_mag, const CompletenessSettings& settings) {
    std::vector<double> values;
    for (const double g : g_mag) {
        if (std::isfinite(g)) {
            values.push_back(g);
        }
    }
    if (values.size() < 10) {
        return kNaN;
    }
    std::sort(values.begin(), values.end());
    const double bin = settings.histogram_bin_mag;
    const double start = std::floor(values.front() / bin) * bin;
    const auto bins = static_cast<std::size_t>((values.back() - start) / bin) + 2;
    std::vector<double> counts(bins, 0.0);
    for (const double g : values) {
        counts[static_cast<std::size_t>((g - start) / bin)] += 1.0;
    }
    const auto reference_bins = std::max<std::size_t>(
        1, static_cast<std::size_t>(std::lround(settings.turnover_reference_mag / bin)));
    const auto median_bin = static_cast<std::size_t>((values[values.size() / 2] - start) / bin);
    for (std::size_t i = std::max(median_bin, reference_bins); i < bins; ++i) {
        const double reference =
            std::accumulate(counts.begin() + static_cast<std::ptrdiff_t>(i - reference_bins),
                            counts.begin() + static_cast<std::ptrdiff_t>(i), 0.0) /
            static_cast<double>(reference_bins);
        if (counts[i] < settings.turnover_drop_fraction * reference) {
            return start + static_cast<double>(i) * bin;
        }
    }
    return start + static_cast<double>(bins) * bin;
}

std::vector<std::array<double, 2>> categoryAbsGRanges(const photometry::ModelPhotometry& photometry,
                                                      const CompletenessSettings& settings) {
    std::vector<std::array<double, 2>> ranges(photometry::kCategoryCount, {kNaN, kNaN});
    for (std::size_t k = 0; k < photometry::kDwarfCategories; ++k) {
        double low = std::numeric_limits<double>::infinity();
        double high = -low;
        for (const double step : {0.0, 0.25, 0.5, 0.75, 0.999}) {
            const double abs_g = photometry.dwarf(static_cast<double>(k) + step).g;
            if (std::isfinite(abs_g)) {
                low = std::min(low, abs_g);
                high = std::max(high, abs_g);
            }
        }
        if (low <= high) {
            ranges[k] = {low, high};
        }
    }
    ranges[photometry::kDwarfCategories] = settings.white_dwarf_abs_g_mag;
    ranges[photometry::kDwarfCategories + 1] = settings.evolved_abs_g_mag;
    return ranges;
}

VOverVmax vOverVmax(std::span<const SampleStar> stars, const ClassGroup& group, double radius_pc,
                    const MagnitudeLimits& limits) {
    double weighted_sum = 0.0;
    double weights = 0.0;
    for (const SampleStar& star : stars) {
        if (!group.categories.test(star.category) || !(star.weight > 0.0) ||
            !withinLimits(star.abs_g_mag, star.distance_pc, limits)) {
            continue;
        }
        const auto [inner, outer] = visibleShellPc(star.abs_g_mag, radius_pc, limits);
        const double v_max = std::pow(outer, 3) - std::pow(inner, 3);
        if (!(v_max > 0.0)) {
            continue;
        }
        const double v = std::pow(std::clamp(star.distance_pc, inner, outer), 3) - std::pow(inner, 3);
        weighted_sum += star.weight * v / v_max;
        weights += star.weight;
    }
    VOverVmax result;
    result.n_effective = weights;
    result.mean = weights > 0.0 ? weighted_sum / weights : kNaN;
    result.sigma = weights > 0.0 ? 1.0 / std::sqrt(12.0 * weights) : kNaN;
    return result;
}

double completenessRadiusPc(std::span<const SampleStar> stars, const ClassGroup& group, double radius_pc,
                            const CompletenessSettings& settings) {
    // Counted first so that the vector is allocated once, at its size (it is one of the largest things alive
    // in the luminosity analysis, which holds the run's peak memory).
    const auto counts = [&](const SampleStar& star) {
        return group.categories.test(star.category) && star.weight >= 0.5 && star.distance_pc <= radius_pc;
    };
    std::vector<double> distances;
    distances.reserve(static_cast<std::size_t>(std::count_if(stars.begin(), stars.end(), counts)));
    for (const SampleStar& star : stars) {
        if (counts(star)) {
            distances.push_back(star.distance_pc);
        }
    }
    std::sort(distances.begin(), distances.end());
    double last_consistent = radius_pc / settings.radius_grid_steps;
    for (int step = 1; step <= settings.radius_grid_steps; ++step) {
        const double r = radius_pc * step / settings.radius_grid_steps;
        const auto inside = static_cast<std::size_t>(std::upper_bound(distances.begin(), distances.end(), r) -
                                                     distances.begin());
        if (static_cast<int>(inside) >= settings.min_objects_to_test &&
            ksUniformVolume(std::span(distances).first(inside), r) > settings.ks_critical) {
            break;
        }
        last_consistent = r;
    }
    return last_consistent;
}

RadiusCompleteness assessCompleteness(std::span<const SampleStar> stars, double radius_pc,
                                      const std::vector<ClassGroup>& groups, const MagnitudeLimits& limits,
                                      const std::vector<std::array<double, 2>>& ranges,
                                      const CompletenessSettings& settings) {
    RadiusCompleteness result;
    result.radius_pc = radius_pc;
    result.complete_abs_g_mag = completeAbsGRange(radius_pc, limits, settings.bright_hole_volume_tolerance);
    const auto [low, high] = result.complete_abs_g_mag;
    for (const ClassGroup& group : groups) {
        GroupCompleteness assessed;
        assessed.name = group.name;
        assessed.v_over_vmax = vOverVmax(stars, group, radius_pc, limits);
        assessed.completeness_radius_pc = completenessRadiusPc(stars, group, radius_pc, settings);
        for (std::size_t k = 0; k < photometry::kCategoryCount; ++k) {
            if (!group.categories.test(k) || std::isnan(ranges[k][0])) {
                continue;
            }
            if (ranges[k][0] < low || ranges[k][1] > high) {
                assessed.outside_range = true;
                if (k < photometry::kDwarfCategories) {
                    assessed.subtypes_outside.push_back(subtypeName(k));
                }
            }
        }
        const VOverVmax& v = assessed.v_over_vmax;
        const bool v_consistent =
            !(v.n_effective > 0.0) || std::abs(v.mean - v.expected) <= settings.v_over_vmax_sigmas * v.sigma;
        assessed.complete = !assessed.outside_range && v_consistent;
        result.groups.push_back(std::move(assessed));
    }
    return result;
}

} // namespace starcensus::census
