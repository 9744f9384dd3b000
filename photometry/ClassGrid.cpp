#include "photometry/ClassGrid.h"

#include "photometry/Classifier.h"
#include "photometry/Threads.h"

#include <cmath>
#include <limits>
#include <thread>
#include <vector>

namespace starcensus::photometry {

ClassGrid::ClassGrid(const ClassGridAxes& axes, const ColourClassifier& with_colour,
                     const MagnitudeClassifier& magnitude_only, unsigned threads)
    : axes_(axes), colour_min_(static_cast<float>(axes.colour_min_mag)),
      magnitude_min_(static_cast<float>(axes.abs_mag_min_mag)),
      inverse_cell_(static_cast<float>(1.0 / axes.cell_mag)),
      colour_cells_(static_cast<int>(std::ceil((axes.colour_max_mag - axes.colour_min_mag) / axes.cell_mag))),
      magnitude_cells_(
          static_cast<int>(std::ceil((axes.abs_mag_max_mag - axes.abs_mag_min_mag) / axes.cell_mag))) {
    by_colour_.resize(static_cast<std::size_t>(colour_cells_) * static_cast<std::size_t>(magnitude_cells_));
    by_magnitude_.resize(static_cast<std::size_t>(magnitude_cells_));
    // Interleaved magnitude rows per thread: each cell is written by one thread only.
    const auto fill_rows = [&](int first, int step) {
        for (int m = first; m < magnitude_cells_; m += step) {
            const double magnitude = axes.abs_mag_min_mag + (m + 0.5) * axes.cell_mag;
            by_magnitude_[static_cast<std::size_t>(m)] = magnitude_only(magnitude);
            for (int c = 0; c < colour_cells_; ++c) {
                const double colour = axes.colour_min_mag + (c + 0.5) * axes.cell_mag;
                by_colour_[static_cast<std::size_t>(m) * static_cast<std::size_t>(colour_cells_) +
                           static_cast<std::size_t>(c)] = with_colour(colour, magnitude);
            }
        }
    };
    const int workers = static_cast<int>(std::min<unsigned>(resolveThreadCount(threads), 64));
    std::vector<std::jthread> pool;
    for (int t = 1; t < workers; ++t) {
        pool.emplace_back(fill_rows, t, workers);
    }
    fill_rows(0, workers);
}

std::optional<Category> ClassGrid::uniformCategory(float colour_low, float colour_high, float magnitude_low,
                                                   float magnitude_high) const noexcept {
    const int first_column = cell(colour_low, colour_min_, colour_cells_);
    const int last_column = cell(colour_high, colour_min_, colour_cells_);
    const int first_row = cell(magnitude_low, magnitude_min_, magnitude_cells_);
    const int last_row = cell(magnitude_high, magnitude_min_, magnitude_cells_);
    if ((first_column | last_column | first_row | last_row) < 0) {
        return std::nullopt;
    }
    const auto at = [&](int row, int column) {
        return by_colour_[static_cast<std::size_t>(row) * static_cast<std::size_t>(colour_cells_) +
                          static_cast<std::size_t>(column)];
    };
    const Category category = at(first_row, first_column);
    for (int row = first_row; row <= last_row; ++row) {
        for (int column = first_column; column <= last_column; ++column) {
            if (at(row, column) != category) {
                return std::nullopt;
            }
        }
    }
    return category;
}

std::optional<Category> ClassGrid::uniformMagnitudeOnlyCategory(float magnitude_low,
                                                                float magnitude_high) const noexcept {
    const int first_row = cell(magnitude_low, magnitude_min_, magnitude_cells_);
    const int last_row = cell(magnitude_high, magnitude_min_, magnitude_cells_);
    if ((first_row | last_row) < 0) {
        return std::nullopt;
    }
    const Category category = by_magnitude_[static_cast<std::size_t>(first_row)];
    for (int row = first_row + 1; row <= last_row; ++row) {
        if (by_magnitude_[static_cast<std::size_t>(row)] != category) {
            return std::nullopt;
        }
    }
    return category;
}

ClassGrid ClassGrid::fromClassifier(const Classifier& classifier, unsigned threads,
                                    const ClassGridAxes& axes) {
    const auto category = [](const Classification& result) {
        return categoryOf(result.stellar_class, result.spectral_code);
    };
    const double no_colour = std::numeric_limits<double>::quiet_NaN();
    return ClassGrid(
        axes,
        [&](double bp_rp, double abs_g) { return category(classifier.classifyClassOnly(abs_g, bp_rp)); },
        [&](double abs_g) { return category(classifier.classifyClassOnly(abs_g, no_colour)); }, threads);
}

} // namespace starcensus::photometry
