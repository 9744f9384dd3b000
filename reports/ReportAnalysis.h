#pragma once
// The numbers behind the report's figures and tables, computed from a run directory's contents
// (ReportInputs) without drawing or touching files.
#include "reports/DensityGrid.h"
#include "reports/ReportInputs.h"
#include "reports/SkyMap.h"

#include <string>
#include <vector>

namespace starcensus::reports {

/// When the per-star figures (colour-magnitude diagram, sky) switch from one marker per star to counts per
/// cell, so that they stay readable, and their files small, from tens to millions of stars.
struct DensitySettings {
    // Markers pile up beyond this many stars in one marker-sized cell (the grids below): their number can
    // no longer be seen. The figure shows counts per cell instead once more than max_piled_up_share of the
    // stars are in such cells, or once there are more stars than cells (the markers would cover the whole
    // plot, as on a well-filled sky) (common practice, no source: a few crowded spots of a scatter plot are
    // still read as "many here", most of the stars piled up are not). With these values the 25 pc demo
    // (~2200 stars, 45% of them in cells of more than 8) keeps its markers; a 100 pc census (~250,000,
    // 99%) is shaded. The rule also bounds the markers a figure holds (~2 per cell at most).
    std::int64_t max_markers_per_cell = 8;
    double max_piled_up_share = 0.5;
    // In the density form of the colour-magnitude diagram, cells with at most this many stars keep them
    // as markers: the sparse outliers stay visible and keep their class.
    std::int64_t max_outliers_per_cell = 2;
    // Marker-sized cells: the diagram's plot area is ~576 x 468 pt and a marker ~4.5 pt across; the sky
    // panel's map ~792 x 396 pt with ~3.5 pt markers.
    int cmd_cells_x = 128;
    int cmd_cells_y = 104;
    int sky_cells_x = 226;
    int sky_cells_y = 113;
    // The sky's density map: the finest nside up to max_nside with a mean of min_mean_per_pixel.
    census::UniformitySettings sky_map{.min_mean_per_pixel = 10.0, .max_nside = 64, .significance = 0.01};
};

struct ReportSettings {
    // Stars drawn in the colour-magnitude diagram and the sky map: membership probability at the
    // largest radius at or above this.
    double member_probability = 0.5;
    // Faint limit (apparent G, mag) used when completeness.json is absent: the Gaia DR3 G limit of
    // ~20.7 (Gaia Collaboration, Vallenari et al. 2023, A&A 674, A1; from memory).
    double default_faint_limit_g = 20.7;
    census::UniformitySettings sky;
    DensitySettings density;
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

    DensitySettings density;
    // Colour-magnitude diagram: the members with BP-RP and M_G, their counts per marker-sized cell of the
    // plotted ranges (x: BP-RP, y: M_G, mag) and whether they are shown as counts (markers would pile up).
    std::vector<std::size_t> cmd_rows;
    std::size_t cmd_without_colour = 0;
    DensityGrid cmd_grid;
    bool cmd_density_form = false;
    // Sky: whether the members' markers would pile up on the map (marker-sized cells of the projected
    // plane), and, for the density form, the counts per HEALPix pixel at the map's own nside.
    bool sky_density_form = false;
    census::PixelCounts sky_map_counts;
};

/// Whether a figure with these counts per marker-sized cell takes its density form (DensitySettings).
bool markersPileUp(const DensityGrid& marker_cells, const DensitySettings& settings);

/// The half extents of the sky panel's window in the projected plane: the map's ellipse plus a margin.
ProjectedPoint skyWindowHalfSize();

ReportAnalysis analyseReport(const ReportInputs& inputs, const ReportSettings& settings);

/// Number of distances at or below r.
double countWithin(const std::vector<double>& sorted_distances_pc, double radius_pc);

} // namespace starcensus::reports
