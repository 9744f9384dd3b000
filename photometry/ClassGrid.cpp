#include "photometry/ClassGrid.h"

#include "photometry/Classifier.h"

#include <cmath>
#include <limits>
#include <utility>
#include <vector>

namespace starcensus::photometry {

ClassGrid::ClassGrid(const ClassGridAxes& axes, ColourClassifier with_colour,
                     const MagnitudeClassifier& magnitude_only)
    : axes_(axes), colour_min_(static_cast<float>(axes.colour_min_mag)),
      magnitude_min_(static_cast<float>(axes.abs_mag_min_mag)),
      inverse_cell_(static_cast<float>(1.0 / axes.cell_mag)),
      colour_cells_(static_cast<int>(std::ceil((axes.colour_max_mag - axes.colour_min_mag) / axes.cell_mag))),
      magnitude_cells_(
          static_cast<int>(std::ceil((axes.abs_mag_max_mag - axes.abs_mag_min_mag) / axes.cell_mag))),
      with_colour_(std::move(with_colour)),
      by_colour_(static_cast<std::size_t>(colour_cells_) * static_cast<std::size_t>(magnitude_cells_)) {
    for (auto& slot : by_colour_) {
        slot.store(kNotYetClassified, std::memory_order_relaxed);
    }
    by_magnitude_.resize(static_cast<std::size_t>(magnitude_cells_));
    for (int m = 0; m < magnitude_cells_; ++m) {
        by_magnitude_[static_cast<std::size_t>(m)] =
            magnitude_only(axes.abs_mag_min_mag + (m + 0.5) * axes.cell_mag);
    }
}

std::optional<Category> ClassGrid::uniformCategory(float colour_low, float colour_high, float magnitude_low,
                                                   float magnitude_high) const {
    const int first_column = cell(colour_low, colour_min_, colour_cells_);
    const int last_column = cell(colour_high, colour_min_, colour_cells_);
    const int first_row = cell(magnitude_low, magnitude_min_, magnitude_cells_);
    const int last_row = cell(magnitude_high, magnitude_min_, magnitude_cells_);
    if ((first_column | last_column | first_row | last_row) < 0) {
        return std::nullopt;
    }
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

ClassGrid ClassGrid::fromClassifier(const Classifier& classifier, const ClassGridAxes& axes) {
    const auto category = [](const Classification& result) {
        return categoryOf(result.stellar_class, result.spectral_code);
    };
    const Classifier* exact = &classifier;
    return ClassGrid(
        axes,
        [exact, category](double bp_rp, double abs_g) {
            return category(exact->classifyClassOnly(abs_g, bp_rp));
        },
        [exact, category](double abs_g) {
            return category(exact->classifyClassOnly(abs_g, std::numeric_limits<double>::quiet_NaN()));
        });
}

} // namespace starcensus::photometry
