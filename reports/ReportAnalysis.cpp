#include "reports/ReportAnalysis.h"

#include "photometry/StellarClass.h"

#include <algorithm>
#include <cmath>

namespace starcensus::reports {

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

} // namespace

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
