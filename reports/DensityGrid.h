#pragma once
// Counts of points on a regular 2-D grid (a 2-D histogram), for the density forms of the report's
// per-star figures: where markers would pile up, the figure shows counts per cell instead. Pure: nothing
// here draws or touches files.
#include <cstdint>
#include <optional>
#include <span>
#include <vector>

namespace starcensus::reports {

/// A regular grid: nx cells over [x_min, x_max] and ny over [y_min, y_max] (x_min < x_max, y_min < y_max).
struct GridAxes {
    double x_min = 0.0;
    double x_max = 1.0;
    int nx = 1;
    double y_min = 0.0;
    double y_max = 1.0;
    int ny = 1;
};

struct DensityGrid {
    GridAxes axes;
    std::vector<std::int64_t> counts; // nx * ny, cell (ix, iy) at ix * ny + iy (x-major, as PLplot's images)

    /// The cell holding (x, y), with NumPy's histogram2d convention: cells are half-open [low, high) except
    /// the last along each axis, which includes its upper edge; none for points outside or NaN.
    std::optional<std::size_t> cellOf(double x, double y) const;
    std::int64_t maxCount() const;
    std::int64_t total() const;
    /// The points in cells holding more than `per_cell` of them.
    std::int64_t countInCellsAbove(std::int64_t per_cell) const;
};

/// Counts the points (x[i], y[i]) per cell; points outside the axes (or NaN) are not counted.
DensityGrid histogram2d(std::span<const double> x, std::span<const double> y, const GridAxes& axes);

} // namespace starcensus::reports
