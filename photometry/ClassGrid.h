#pragma once
// A rasterised classifier for the Monte Carlo hot loop: the census category (StellarClass.h) of every
// cell of a fine grid in (BP-RP, M_G), and of a 1-D grid in M_G for objects without colours. A 2-D cell
// is classified (by the exact classifier, at its centre) the first time a lookup reaches it: a census
// touches ~11,000 of the grid's ~560,000 cells (25 pc bench). After that a lookup is two multiplies and a
// load.
#include "photometry/StellarClass.h"

#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <vector>

namespace starcensus::photometry {

class Classifier;

/// Extent and resolution of the grid (mag). Outside it (and for NaN), lookups return `unclassified`.
struct ClassGridAxes {
    double colour_min_mag = -1.0;
    double colour_max_mag = 6.0;
    double abs_mag_min_mag = -6.0;
    double abs_mag_max_mag = 26.0;
    double cell_mag = 0.02; // 0.02 mag: well below typical photometric errors near class boundaries
};

class ClassGrid {
  public:
    using ColourClassifier = std::function<Category(double bp_rp_mag, double abs_g_mag)>;
    using MagnitudeClassifier = std::function<Category(double abs_g_mag)>;

    /// Keeps the classifiers, which must outlive the grid and be safe to call from several threads at
    /// once: the 1-D grid is filled here, 2-D cells on first lookup.
    ClassGrid(const ClassGridAxes& axes, ColourClassifier with_colour,
              const MagnitudeClassifier& magnitude_only);

    /// Classifier::classifyClassOnly() on (BP-RP, M_G), and on M_G alone for the 1-D grid. `classifier`
    /// must outlive the grid.
    static ClassGrid fromClassifier(const Classifier& classifier, const ClassGridAxes& axes = {});

    Category lookup(float bp_rp_mag, float abs_g_mag) const {
        const int row = cell(abs_g_mag, magnitude_min_, magnitude_cells_);
        const int column = cell(bp_rp_mag, colour_min_, colour_cells_);
        return (row | column) < 0 ? kOutside : at(row, column);
    }

    Category lookupMagnitudeOnly(float abs_g_mag) const noexcept {
        const int row = cell(abs_g_mag, magnitude_min_, magnitude_cells_);
        return row < 0 ? kOutside : by_magnitude_[static_cast<std::size_t>(row)];
    }

    /// The category of every lookup() with BP-RP in [colour_low, colour_high] and M_G in
    /// [magnitude_low, magnitude_high] (mag), if all the cells the box touches share one and the box lies
    /// inside the grid; otherwise nothing. Lets the Monte Carlo skip stars whose class cannot change.
    std::optional<Category> uniformCategory(float colour_low, float colour_high, float magnitude_low,
                                            float magnitude_high) const;
    /// The same for lookupMagnitudeOnly() over [magnitude_low, magnitude_high].
    std::optional<Category> uniformMagnitudeOnlyCategory(float magnitude_low,
                                                         float magnitude_high) const noexcept;

    const ClassGridAxes& axes() const { return axes_; }
    /// Cell size (mag) on both axes.
    double cellMag() const { return axes_.cell_mag; }

  private:
    static constexpr Category kOutside = kDwarfCategories + 2; // unclassified: outside every locus
    static constexpr Category kNotYetClassified = 0xff;        // no category has this value

    /// The category of a 2-D cell, classifying it on first use. Threads that reach a new cell together
    /// each classify it and store the same value.
    Category at(int row, int column) const {
        std::atomic<Category>& slot =
            by_colour_[static_cast<std::size_t>(row) * static_cast<std::size_t>(colour_cells_) +
                       static_cast<std::size_t>(column)];
        Category category = slot.load(std::memory_order_relaxed);
        if (category == kNotYetClassified) {
            category = with_colour_(axes_.colour_min_mag + (column + 0.5) * axes_.cell_mag,
                                    axes_.abs_mag_min_mag + (row + 0.5) * axes_.cell_mag);
            slot.store(category, std::memory_order_relaxed);
        }
        return category;
    }

    /// The cell index, or -1 outside the grid or for NaN (the comparison is false for NaN).
    int cell(float value, float minimum, int cells) const noexcept {
        const float position = (value - minimum) * inverse_cell_;
        return position >= 0.0f && position < static_cast<float>(cells) ? static_cast<int>(position) : -1;
    }

    ClassGridAxes axes_;
    float colour_min_;
    float magnitude_min_;
    float inverse_cell_;
    int colour_cells_;
    int magnitude_cells_;
    ColourClassifier with_colour_;
    mutable std::vector<std::atomic<Category>> by_colour_; // [magnitude cell][colour cell], lazily filled
    std::vector<Category> by_magnitude_;                   // [magnitude cell]
};

} // namespace starcensus::photometry
