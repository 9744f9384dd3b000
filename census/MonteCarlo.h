#pragma once
// Monte Carlo over the measurement errors (parallax, G, BP-RP): in each draw every candidate gets a true
// distance from its membership posterior and photometry from its errors; membership in each radius,
// absolute magnitude and class are recomputed and counted.
//
// Layout for speed: a structure of arrays built once (PreparedSample), processed star-major (each star's
// tables stay in cache while all its draws are made), per-thread tallies summed at the end. Each star has
// its own random stream (seed, row index), so the result is identical for any thread count, and the stars of
// a sample selected from another (the order constructors) draw what they drew there. A star whose
// draws cannot differ (membership probability exactly 0 or 1 at every radius, and every outcome its errors
// allow inside cells of one category) is tallied without drawing: the numbers the draws would give. A
// sample that is drawn only once is best drawn as it is prepared (prepareAndDraw): no table is then kept for
// the draws, or tabulated a second time for them.
#include "census/Membership.h"
#include "census/RowClassification.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"
#include "photometry/StellarClass.h"
#include "photometry/base/Progress.h"
#include "photometry/catalog/CatalogRow.h"

#include <array>
#include <cstdint>
#include <span>
#include <vector>

namespace starcensus::census {

/// Monte Carlo settings.
struct DrawSettings {
    int draws = 1000;       // number of realisations of the sample
    std::uint64_t seed = 1; // master seed; each star draws from stream (seed, its row index)
    unsigned threads = 0;   // 0 = all hardware threads
    // Optional: star-draws done (items_done, advanced once per block of stars) and to do (items_total),
    // for a caller's display (photometry/base/Progress.h). Never read by the draws.
    ProgressCounters* progress = nullptr;
    // false: DrawTallies::star_classes stays empty (13 counters per star that only sample.fits and
    // hosts.fits read)
    bool per_star_classes = true;
};

struct DrawTallies;
struct DrawnSample;

/// The per-star inputs of the Monte Carlo, as a structure of arrays.
class PreparedSample {
  public:
    static constexpr int kQuantiles = DistancePosterior::kQuantileNodes;
    // In the per-star category arrays: no single category, the draws decide it
    static constexpr photometry::Category kDrawnCategory = 0xff;

    /// A star whose class no draw can change gets it in every draw (while its membership is still
    /// drawn): rows with parallax_mas / parallax_error_mas below rules.min_parallax_snr_to_classify (the
    /// low-S/N unclassified category), rows with no band the classifier can place (no photometry,
    /// photometry::hasClassifiableBands), and, with a classifier,
    /// rows whose class comes from their literature spectral type (RowClassification.h).
    /// Stars without BP-RP are classified from M_G, G-RP, V-Ks and the near infrared, which the
    /// (BP-RP, M_G) grid cannot see: with a classifier, their category is tabulated once at every distance
    /// quantile (exact classifier; their photometric noise is neglected beside the distance spread).
    /// Without one, the grid's M_G-only table is used. With the grid as well, so are stars with BP-RP that
    /// the grid would misname: those whose exact class at the catalogue parallax uses the near infrared
    /// (or is within 1 mag of the M_G where it starts to), or differs from the class of their grid cell
    /// (stars on a class boundary, where the cell's centre can lie on the other side).
    /// With the grid, a star whose draws cannot differ keeps only its category and membership
    /// probabilities (no quantile table), and drawSample must be given the same grid.
    PreparedSample(std::span<const photometry::CatalogRow> rows, std::vector<double> radii_pc,
                   const MembershipSettings& membership, const RowClassRules& rules, unsigned threads,
                   const photometry::Classifier* classifier = nullptr,
                   const photometry::ClassGrid* grid = nullptr);
    /// The same for the rows rows[order[0]], rows[order[1]], ... (star s is rows[order[s]]), without a
    /// copy of them. Star s draws from row order[s]'s stream, as in a sample of all the rows.
    PreparedSample(std::span<const photometry::CatalogRow> rows, std::span<const std::uint32_t> order,
                   std::vector<double> radii_pc, const MembershipSettings& membership,
                   const RowClassRules& rules, unsigned threads,
                   const photometry::Classifier* classifier = nullptr,
                   const photometry::ClassGrid* grid = nullptr);

    /// The stars source[order[0]], source[order[1]], ...: what the constructor gives for those rows of
    /// source's rows (each star's data depends on its row alone), without preparing them again; each
    /// draws from its stream in source, so its draws are the ones it has there.
    PreparedSample(const PreparedSample& source, std::span<const std::uint32_t> order);

    std::size_t size() const { return stars_; }
    const std::vector<double>& radii() const { return radii_pc_; }
    /// P(d < radii()[r]) of star s.
    float probabilityWithin(std::size_t s, std::size_t r) const {
        return probability_within_[s * radii_pc_.size() + r];
    }
    /// Expected count within radii()[r]: the sum of the membership probabilities.
    double expectedCount(std::size_t r) const;
    /// The grid given to the constructor (nullptr without one).
    const photometry::ClassGrid* grid() const { return grid_; }
    /// Frees what only the draws read (photometry, quantile and category tables: about 80 bytes a star in
    /// a 100 pc sample), keeping size(), radii(), probabilityWithin() and expectedCount(). For after the
    /// last drawSample(); drawing this sample again, or selecting from it, throws std::logic_error.
    void releaseDrawTables();

  private:
    friend class SampleDrawer;
    friend DrawnSample prepareAndDraw(std::span<const photometry::CatalogRow> rows,
                                      std::vector<double> radii_pc, const MembershipSettings& membership,
                                      const RowClassRules& rules, const photometry::Classifier& classifier,
                                      const photometry::ClassGrid& grid, const DrawSettings& settings);
    // The order constructor; with draw_now, each star's draws are made as soon as its posterior and
    // categories are, into *tallies, and no draw tables are kept.
    PreparedSample(std::span<const photometry::CatalogRow> rows, std::span<const std::uint32_t> order,
                   std::vector<double> radii_pc, const MembershipSettings& membership,
                   const RowClassRules& rules, unsigned threads, const photometry::Classifier* classifier,
                   const photometry::ClassGrid* grid, const DrawSettings* draw_now, DrawTallies* tallies);
    static constexpr std::uint32_t kNoRow = 0xffffffffu;
    // In DrawnStar::posterior: the star's table is its block's gaussians[posterior & ~kGaussianRow]
    static constexpr std::uint32_t kGaussianRow = 0x80000000u;
    // A posterior on the grid, by what makes it: the draws tabulate it again from these (16 bytes a star
    // instead of its 260-byte quantile table; the same arithmetic, so the same table).
    struct GridPosteriorInputs {
        double parallax_mas, parallax_error_mas; // the catalogue values
    };
    // What the draws read of a star whose draws can differ (28 bytes; the other stars of a 100 pc sample,
    // about 70% of them, keep none).
    struct DrawnStar {
        float g_mag = 0.0f, g_error_mag = 0.0f;
        float colour_mag = 0.0f, colour_error_mag = 0.0f; // BP-RP, NaN if either band is missing
        // row in the block's gridded, or kGaussianRow | row in gaussians; kNoRow with a fixed category,
        // whose draws read no distance modulus
        std::uint32_t posterior = 0;
        std::uint32_t categories = kNoRow;           // row in the block's categories, kNoRow without
        photometry::Category fixed = kDrawnCategory; // the category of every draw, or kDrawnCategory
    };
    // Per block of kBlockStars stars (MonteCarlo.cpp), the stars whose draws can differ and their tables:
    // gridded, the posteriors on the grid; gaussians, those on the Gaussian shortcut (24 bytes a star); the
    // draws refill each star's distance-modulus quantile table from either. categories [row][kQuantiles],
    // the exact classifier's category at each distance quantile, for the stars the (BP-RP, M_G) grid
    // cannot stand for (see the constructor). Kept per block, not joined, so they are never held twice.
    struct BlockTables {
        std::vector<DrawnStar> drawn;
        std::vector<GridPosteriorInputs> gridded;
        std::vector<DistancePosterior::GaussianForm> gaussians;
        std::vector<photometry::Category> categories;
    };
    void requireDrawTables(const char* what) const;
    /// A drawn star's quantile table, filled into `scratch` from its gridded or Gaussian form.
    const float* quantileTable(const BlockTables& tables, const DrawnStar& star,
                               std::array<float, kQuantiles>& scratch) const;
    std::size_t stars_ = 0;
    bool draw_tables_released_ = false;
    std::vector<double> radii_pc_;
    MembershipSettings membership_;         // what the gridded posteriors are tabulated again with
    std::vector<float> probability_within_; // [star][radius]
    // [star]: the row index whose random stream the star draws from; empty: the star's own index
    std::vector<std::uint32_t> stream_rows_;
    std::vector<BlockTables> block_tables_;
    // [star]: the star's row in its block's drawn, kNoRow without one (a star whose every draw is known,
    // see certain_categories_)
    std::vector<std::uint32_t> drawn_row_;
    // [star], with a grid: the category every draw gives when no draw can differ (membership probability
    // 0 or 1 at every radius, every outcome inside one category), else kDrawnCategory; empty without a
    // grid, when the draws test it themselves (every star is then drawn). The grid the draws use must then
    // be this one.
    std::vector<photometry::Category> certain_categories_;
    const photometry::ClassGrid* grid_ = nullptr;
};

/// Per star and class, the draws that gave the star that class. A star whose every draw gave one class
/// (all but 7,459 of the 399,783 stars of a 100 pc mock at 100 draws) is held as that class, 2 bytes; the
/// others' counters sit in the chunk of kChunkStars stars they belong to (52 bytes each). 13 bytes a star
/// before.
class StarClassCounts {
  public:
    /// Stars per chunk: set() for the stars of one chunk must come from one thread, in star order (the
    /// Monte Carlo's blocks of stars are these chunks).
    static constexpr std::size_t kChunkStars = 256;

    StarClassCounts() = default;
    /// Zeros for `stars` stars of `draws` draws each.
    StarClassCounts(std::size_t stars, int draws);

    bool empty() const { return only_class_.empty(); }
    std::size_t size() const { return only_class_.size(); }
    std::uint32_t draws(std::size_t star, photometry::StellarClass c) const {
        const std::uint8_t only = only_class_[star];
        if (only == kMixed) {
            return chunks_[star / kChunkStars][mixed_slot_[star]][static_cast<std::size_t>(c)];
        }
        return only == static_cast<std::uint8_t>(c) ? static_cast<std::uint32_t>(draws_) : 0;
    }
    /// Star `star`'s counters, one per class in StellarClass order.
    void set(std::size_t star, const std::array<std::uint32_t, photometry::kClassCount>& counts);
    /// The stars of `more` (as many draws) after these.
    void append(const StarClassCounts& more);
    /// The same counts for every star and class.
    bool operator==(const StarClassCounts& other) const;

  private:
    using Counters = std::array<std::uint32_t, photometry::kClassCount>;
    static constexpr std::uint8_t kNone = 0xfe;  // no draw counted (all counters zero)
    static constexpr std::uint8_t kMixed = 0xff; // counters in the star's chunk, at mixed_slot_
    int draws_ = 0;
    std::vector<std::uint8_t> only_class_; // [star]: the class of every draw, kMixed or kNone
    std::vector<std::uint8_t> mixed_slot_; // [star]: a kMixed star's row in its chunk
    std::vector<std::vector<Counters>> chunks_;
};

/// Member counts per radius, census category and draw, and per-star class frequencies.
struct DrawTallies {
    int draws = 0;
    std::size_t radii = 0;
    // [(r * kCategoryCount + category) * draws + draw]: draw-fastest, so a star whose category is stable
    // across draws walks memory sequentially.
    std::vector<std::uint32_t> counts;
    // Per star (those drawn) and class, the draws with that class; empty with
    // DrawSettings::per_star_classes false
    StarClassCounts star_classes;

    std::uint32_t count(int draw, std::size_t r, photometry::Category category) const {
        return counts[(r * photometry::kCategoryCount + category) * static_cast<std::size_t>(draws) +
                      static_cast<std::size_t>(draw)];
    }
    /// The member count of a whole class in one draw.
    std::uint32_t classCount(int draw, std::size_t r, photometry::StellarClass c) const;
};

DrawTallies drawSample(const PreparedSample& sample, const photometry::ClassGrid& classes,
                       const DrawSettings& settings);

/// The tallies of the sample's stars [begin, end) alone (star_classes holds those stars). Each star draws
/// from its own stream, so the stars [0, end) drawn this way give what drawSample gives on a sample of
/// those rows alone.
DrawTallies drawSample(const PreparedSample& sample, const photometry::ClassGrid& classes,
                       const DrawSettings& settings, std::size_t begin, std::size_t end);

/// A sample and its draws.
struct DrawnSample {
    PreparedSample sample;
    DrawTallies tallies;
};

/// PreparedSample (with the classifier and grid) and drawSample in one pass, for a sample drawn only once
/// (no system census): each star is drawn while its posterior and category table are at hand, so no table
/// is kept for the draws or tabulated again for them. The tallies are drawSample's; the sample is as after
/// releaseDrawTables().
DrawnSample prepareAndDraw(std::span<const photometry::CatalogRow> rows, std::vector<double> radii_pc,
                           const MembershipSettings& membership, const RowClassRules& rules,
                           const photometry::Classifier& classifier, const photometry::ClassGrid& grid,
                           const DrawSettings& settings);

/// Adds the tallies of further stars (`more`: same draws and radii, the stars after those of `into`).
void appendTallies(DrawTallies& into, const DrawTallies& more);

} // namespace starcensus::census
