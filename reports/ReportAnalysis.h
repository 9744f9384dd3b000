#pragma once
// The numbers behind the report's figures and tables, computed from a run directory's contents
// (ReportInputs) without drawing or touching files.
#include "reports/ReportInputs.h"
#include "reports/SkyMap.h"

#include <string>
#include <vector>

namespace starcensus::reports {

struct ReportSettings {
    // Stars drawn in the colour-magnitude diagram and the sky map: membership probability at the
    // largest radius at or above this.
    double member_probability = 0.5;
    // Faint limit (apparent G, mag) used when completeness.json is absent: the Gaia DR3 G limit of
    // ~20.7 (Gaia Collaboration, Vallenari et al. 2023, A&A 674, A1; from memory).
    double default_faint_limit_g = 20.7;
    census::UniformitySettings sky;
};

/// Distances (pc, ascending) of the rows of one class whose parallax (minus the zero point) is positive:
/// N(<r) is the number of them at or below r.
struct ClassDistances {
    std::string class_name;
    std::vector<double> distances_pc;
    std::vector<double> weighted_counts; // sum of p_within per census radius (SampleColumns::radii_pc)
};

struct ReportAnalysis {
    double largest_radius_pc = 0.0;
    double member_probability = 0.5;
    std::vector<std::size_t> members; // sample rows with p_within(largest radius) >= member_probability
    std::vector<GalacticPosition> member_positions;
    census::PixelCounts sky_counts;
    census::UniformityTest uniformity;
    double faint_limit_g = 20.7;
    std::string faint_limit_source; // "completeness.json (estimated)", "default", ...
    double faint_limit_abs_g = 0.0; // at the largest radius: m_lim - 5 log10(R / 10 pc)
    double parallax_zero_point_mas = 0.0;
    std::vector<ClassDistances> classes; // classes present in the sample, in kClassNames order
    ClassDistances all;                  // every row
};

ReportAnalysis analyseReport(const ReportInputs& inputs, const ReportSettings& settings);

/// Number of distances at or below r.
double countWithin(const std::vector<double>& sorted_distances_pc, double radius_pc);

} // namespace starcensus::reports
