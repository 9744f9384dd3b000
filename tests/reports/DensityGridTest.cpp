#include "reports/DensityGrid.h"
#include "reports/ReportAnalysis.h"
#include "tests/support/ReferencePython.h"

#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <limits>
#include <random>
#include <sstream>

using namespace starcensus::reports;

TEST_CASE("histogram2d: the counts of NumPy's histogram2d, cell for cell, edges and NaN included") {
    // Seeded points around a tilted band (like a main sequence), some outside the range, some exactly on
    // the outer edges (which NumPy counts in the last cell) and some NaN (which it drops).
    std::mt19937_64 generator(12);
    std::normal_distribution<double> spread(0.0, 0.6);
    std::uniform_real_distribution<double> along(-1.0, 5.0);
    std::vector<double> x;
    std::vector<double> y;
    for (int i = 0; i < 20000; ++i) {
        const double colour = along(generator);
        x.push_back(colour);
        y.push_back(2.0 * colour + 3.0 + spread(generator));
    }
    const GridAxes axes{-0.5, 4.0, 45, 0.0, 15.0, 30};
    for (const auto& [edge_x, edge_y] : std::vector<std::pair<double, double>>{
             {4.0, 7.0}, {-0.5, 15.0}, {4.0, 15.0}, {1.0, 0.0}, {std::nan(""), 3.0}, {2.0, std::nan("")}}) {
        x.push_back(edge_x);
        y.push_back(edge_y);
    }
    const auto grid = histogram2d(x, y, axes);
    REQUIRE(grid.counts.size() == 45u * 30u);

    const starcensus::testing::ScratchDirectory scratch("starcensus-histogram2d");
    {
        std::ofstream points(scratch.file("points.txt"));
        points.precision(17);
        for (std::size_t i = 0; i < x.size(); ++i) {
            points << x[i] << ' ' << y[i] << '\n';
        }
    }
    std::istringstream reference(starcensus::testing::runReferencePython(
        "histogram2d.py", scratch.file("points.txt") + " 45 -0.5 4.0 30 0.0 15.0"));
    std::int64_t inside = 0;
    for (std::size_t cell = 0; cell < grid.counts.size(); ++cell) {
        std::int64_t expected = -1;
        reference >> expected;
        REQUIRE(reference);
        CAPTURE(cell);
        CHECK(grid.counts[cell] == expected); // exact: both count the same points
        inside += expected;
    }
    // Every star inside the range is in exactly one cell.
    std::int64_t in_range = 0;
    for (std::size_t i = 0; i < x.size(); ++i) {
        in_range += x[i] >= -0.5 && x[i] <= 4.0 && y[i] >= 0.0 && y[i] <= 15.0 ? 1 : 0;
    }
    CHECK(grid.total() == in_range);
    CHECK(inside == in_range);
    CHECK(grid.cellOf(4.0, 15.0) == 44u * 30u + 29u); // the upper edges belong to the last cells
    CHECK_FALSE(grid.cellOf(4.0 + 1e-9, 1.0).has_value());
    CHECK_FALSE(grid.cellOf(std::nan(""), 1.0).has_value());
}

namespace {

/// `count` points, one at the centre of each unit cell, row by row `columns` wide.
std::pair<std::vector<double>, std::vector<double>> onePerCell(int count, int columns) {
    std::pair<std::vector<double>, std::vector<double>> points;
    for (int i = 0; i < count; ++i) {
        points.first.push_back(i % columns + 0.5);
        points.second.push_back(i / columns + 0.5);
    }
    return points;
}

} // namespace

TEST_CASE("markers pile up: the switch to the density form") {
    const DensitySettings settings; // more than 8 stars in a cell for more than half of the stars
    const GridAxes axes{0.0, 20.0, 20, 0.0, 20.0, 20};
    // One star in each of 100 cells: nothing overlaps.
    auto [x, y] = onePerCell(100, 10);
    CHECK_FALSE(markersPileUp(histogram2d(x, y, axes), settings));
    // 90 more in one cell: 91 of 190 stars (48%) are piled up, still under half.
    x.insert(x.end(), 90, 3.5);
    y.insert(y.end(), 90, 3.5);
    const auto grid = histogram2d(x, y, axes);
    CHECK(grid.countInCellsAbove(8) == 91);
    CHECK_FALSE(markersPileUp(grid, settings));
    // 10 more there: 101 of 200, over half.
    x.insert(x.end(), 10, 3.5);
    y.insert(y.end(), 10, 3.5);
    CHECK(markersPileUp(histogram2d(x, y, axes), settings));

    // One star in every cell covers the plot; one more than cells, nothing piled up, is the density form.
    auto [spread_x, spread_y] = onePerCell(400, 20);
    CHECK_FALSE(markersPileUp(histogram2d(spread_x, spread_y, axes), settings));
    spread_x.push_back(0.5);
    spread_y.push_back(0.5);
    CHECK(markersPileUp(histogram2d(spread_x, spread_y, axes), settings));
}
