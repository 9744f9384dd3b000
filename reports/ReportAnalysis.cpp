#include "reports/ReportAnalysis.h"

#include "photometry/StellarClass.h"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace starcensus::reports {

bool markersPileUp(const DensityGrid& marker_cells, const DensitySettings& settings) {
    const auto stars = marker_cells.total();
    const auto piled_up = marker_cells.countInCellsAbove(settings.max_markers_per_cell);
    return stars > static_cast<std::int64_t>(marker_cells.counts.size()) ||
           static_cast<double>(piled_up) > settings.max_piled_up_share * static_cast<double>(stars);
}

namespace {

ClassDistances distancesOf(const SampleColumns& sample, const std::string& class_name,
                           double parallax_zero_point_mas) {
    ClassDistances result{class_name, {}, std::vector<double>(sample.radii_pc.size(), 0.0)};
    for (std::size_t row = 0; row < sample.size(); ++row) {
        if (!class_name.empty() && sample.class_name[row] != class_name) {
            continue;
        }
        const double parallax_mas = sample.parallax_mas[row] - parallax_zero_point_mas;
        if (parallax_mas > 0.0) {
            result.distances_pc.push_back(1000.0 / parallax_mas);
        }
        for (std::size_t r = 0; r < sample.radii_pc.size(); ++r) {
            result.weighted_counts[r] += sample.p_within[r][row];
        }
    }
    std::sort(result.distances_pc.begin(), result.distances_pc.end());
    return result;
}

/// The colour-magnitude diagram's members and their cells; the plotted ranges take in every star with
/// both values (BP-RP up to 6 mag) and the faint limit.
void analyseColourMagnitude(const SampleColumns& sample, ReportAnalysis& analysis) {
    GridAxes axes{-0.5,
                  4.0,
                  analysis.density.cmd_cells_x,
                  0.0,
                  analysis.faint_limit_abs_g + 1.0,
                  analysis.density.cmd_cells_y};
    std::vector<double> colours;
    std::vector<double> magnitudes;
    for (const auto row : analysis.members) {
        const double colour = sample.bp_rp_mag[row];
        const double magnitude = sample.abs_g_mag[row];
        if (!std::isfinite(colour) || !std::isfinite(magnitude)) {
            ++analysis.cmd_without_colour;
            continue;
        }
        analysis.cmd_rows.push_back(row);
        colours.push_back(colour);
        magnitudes.push_back(magnitude);
        axes.x_min = std::min(axes.x_min, colour - 0.2);
        axes.x_max = std::max(axes.x_max, colour + 0.2);
        axes.y_min = std::min(axes.y_min, magnitude - 0.5);
        axes.y_max = std::max(axes.y_max, magnitude + 0.5);
    }
    axes.x_max = std::min(axes.x_max, 6.0);
    analysis.cmd_grid = histogram2d(colours, magnitudes, axes);
    analysis.cmd_density_form = markersPileUp(analysis.cmd_grid, analysis.density);
}

/// Whether the members' markers would pile up on the sky map, and the map's counts per pixel.
void analyseSkyDensity(ReportAnalysis& analysis) {
    const auto half = skyWindowHalfSize();
    std::vector<double> x;
    std::vector<double> y;
    for (const auto& position : analysis.member_positions) {
        const auto point =
            hammerAitoff(position.l_deg > 180.0 ? position.l_deg - 360.0 : position.l_deg, position.b_deg);
        x.push_back(point.x);
        y.push_back(point.y);
    }
    const GridAxes axes{-half.x, half.x, analysis.density.sky_cells_x,
                        -half.y, half.y, analysis.density.sky_cells_y};
    analysis.sky_density_form = markersPileUp(histogram2d(x, y, axes), analysis.density);
    analysis.sky_map_counts = census::countPerPixel(
        analysis.member_positions,
        census::chooseNside(static_cast<std::int64_t>(analysis.members.size()), analysis.density.sky_map));
}

} // namespace

ProjectedPoint skyWindowHalfSize() {
    return {2.0 * std::numbers::sqrt2 + 0.1, std::numbers::sqrt2 + 0.1};
}

double countWithin(const std::vector<double>& sorted_distances_pc, double radius_pc) {
    return static_cast<double>(
        std::upper_bound(sorted_distances_pc.begin(), sorted_distances_pc.end(), radius_pc) -
        sorted_distances_pc.begin());
}

ReportAnalysis analyseReport(const ReportInputs& inputs, const ReportSettings& settings) {
    const SampleColumns& sample = inputs.sample;
    ReportAnalysis analysis;
    analysis.largest_radius_pc = sample.radii_pc.back();
    analysis.member_probability = settings.member_probability;
    for (std::size_t row = 0; row < sample.size(); ++row) {
        if (sample.p_within.back()[row] >= settings.member_probability) {
            analysis.members.push_back(row);
            analysis.member_positions.push_back(
                census::galacticFromIcrs(sample.ra_deg[row], sample.dec_deg[row]));
        }
    }
    const int nside = census::chooseNside(static_cast<std::int64_t>(analysis.members.size()), settings.sky);
    analysis.sky_counts = census::countPerPixel(analysis.member_positions, nside);
    analysis.uniformity = census::testUniformity(analysis.sky_counts, settings.sky.significance);

    analysis.faint_limit_g = settings.default_faint_limit_g;
    analysis.faint_limit_source = "default (no completeness.json)";
    if (inputs.completeness && inputs.completeness->contains("faint_limit_g")) {
        analysis.faint_limit_g = inputs.completeness->at("faint_limit_g").get<double>();
        analysis.faint_limit_source =
            "completeness.json (" +
            inputs.completeness->value("faint_limit_source", std::string("unstated")) + ")";
    }
    analysis.faint_limit_abs_g = analysis.faint_limit_g - 5.0 * std::log10(analysis.largest_radius_pc / 10.0);

    analysis.density = settings.density;
    analyseColourMagnitude(sample, analysis);
    analyseSkyDensity(analysis);

    const auto& provenance = inputs.fractions.value("provenance", nlohmann::json::object());
    analysis.parallax_zero_point_mas = provenance.value("parallax_zero_point_mas", 0.0);
    analysis.all = distancesOf(sample, "", analysis.parallax_zero_point_mas);
    analysis.all.class_name = "all";
    for (const auto name : photometry::kClassNames) {
        const std::string class_name(name);
        if (std::find(sample.class_name.begin(), sample.class_name.end(), class_name) !=
            sample.class_name.end()) {
            analysis.classes.push_back(distancesOf(sample, class_name, analysis.parallax_zero_point_mas));
        }
    }
    return analysis;
}

} // namespace starcensus::reports
