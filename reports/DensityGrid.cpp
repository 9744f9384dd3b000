#include "reports/DensityGrid.h"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace starcensus::reports {

namespace {

/// Index of the cell of `value` along one axis, or -1 outside [low, high].
int indexAlong(double value, double low, double high, int cells) {
    if (!(value >= low && value <= high)) { // also false for NaN
        return -1;
    }
    const auto index = static_cast<int>(std::floor((value - low) / (high - low) * cells));
    return std::min(index, cells - 1); // the upper edge belongs to the last cell
}

} // namespace

std::optional<std::size_t> DensityGrid::cellOf(double x, double y) const {
    const int ix = indexAlong(x, axes.x_min, axes.x_max, axes.nx);
    const int iy = indexAlong(y, axes.y_min, axes.y_max, axes.ny);
    if (ix < 0 || iy < 0) {
        return std::nullopt;
    }
    return static_cast<std::size_t>(ix) * static_cast<std::size_t>(axes.ny) + static_cast<std::size_t>(iy);
}

std::int64_t DensityGrid::maxCount() const {
    return counts.empty() ? 0 : *std::max_element(counts.begin(), counts.end());
}

std::int64_t DensityGrid::total() const {
    return std::accumulate(counts.begin(), counts.end(), std::int64_t{0});
}

std::int64_t DensityGrid::countInCellsAbove(std::int64_t per_cell) const {
    std::int64_t points = 0;
    for (const auto count : counts) {
        points += count > per_cell ? count : 0;
    }
    return points;
}

DensityGrid histogram2d(std::span<const double> x, std::span<const double> y, const GridAxes& axes) {
    DensityGrid grid{axes, std::vector<std::int64_t>(
                               static_cast<std::size_t>(axes.nx) * static_cast<std::size_t>(axes.ny), 0)};
    for (std::size_t i = 0; i < std::min(x.size(), y.size()); ++i) {
        if (const auto cell = grid.cellOf(x[i], y[i])) {
            ++grid.counts[*cell];
        }
    }
    return grid;
}

} // namespace starcensus::reports
