#include "census/MonteCarlo.h"

#include "census/Random.h"
#include "census/detail/FastNormal.h"
#include "photometry/base/Threads.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <optional>
#include <stdexcept>
#include <string>
#include <type_traits>

namespace starcensus::census {

namespace {

const photometry::Category kUnclassified =
    photometry::categoryOf(photometry::StellarClass::Unclassified, 0.0);

// Stars per random stream and per unit of work handed to a thread; one thread sets a block's class
// counts, as StarClassCounts requires.
constexpr std::size_t kBlockStars = StarClassCounts::kChunkStars;

/// Runs body(begin, end, worker) over [0, count) in blocks of kBlockStars stars, the project's thread
/// loop handing out the blocks.
template <class Body>
void forEachBlock(std::size_t count, unsigned threads, Body&& body) {
    forEachIndex((count + kBlockStars - 1) / kBlockStars, threads, [&](std::size_t block, unsigned worker) {
        body(block * kBlockStars, std::min(count, (block + 1) * kBlockStars), worker);
    });
}

float quadratureSum(double a, double b) {
    return static_cast<float>(std::sqrt(a * a + b * b));
}

float finiteOrZero(double value) {
    return std::isfinite(value) ? static_cast<float>(value) : 0.0f;
}

/// True when the (BP-RP, M_G) grid would give a star with colours another class than sample.fits: its exact
/// class uses (or nearly uses) the near infrared, which the grid does not see, or differs from its cell's.
bool misnamedByGrid(const photometry::CatalogRow& row, const photometry::Classifier& classifier,
                    const photometry::ClassGrid* grid, const RowClassRules& rules) {
    if (grid == nullptr) {
        return false;
    }
    const photometry::Classification exact = classifyRowPhotometry(row, classifier, rules);
    constexpr double kInfraredReachMag = 1.0; // M_G margin below the late-type threshold
    const bool has_infrared = !std::isnan(row.j_mag - row.ks_mag) || !std::isnan(row.w1_mag - row.w2_mag);
    const bool infrared =
        hasFlag(exact.flags, photometry::ClassificationFlag::NearInfrared) ||
        (has_infrared && exact.abs_g_mag > classifier.settings().late_type_abs_g_mag - kInfraredReachMag);
    const photometry::Category cell =
        grid->lookup(static_cast<float>(exact.bp_rp_mag), static_cast<float>(exact.abs_g_mag));
    return infrared || photometry::classOfCategory(cell) != exact.stellar_class;
}

/// What one star's draws, and the test whether they can differ, read besides its membership probabilities.
struct StarDrawInputs {
    const float* quantiles;                // [kQuantiles] distance moduli; nullptr with a fixed category
    const photometry::Category* tabulated; // [kQuantiles] categories, or nullptr
    photometry::Category fixed;            // the category of every draw, or the drawn marker
    float g_mag, g_error_mag, colour_mag, colour_error_mag;
};

/// True when the star's membership is certain at every radius: probability exactly 0 or 1.
bool membershipCertain(std::span<const float> within) {
    return std::none_of(within.begin(), within.end(), [](float p) { return p > 0.0f && p < 1.0f; });
}

/// The category every draw of a star must give, when no draw can change it: its fixed category, or the
/// star's whole range of outcomes (the extreme distance moduli of its draws, normal deviates up to
/// FastNormal's largest, `largest_deviate`) inside cells of one category. With its membership certain too,
/// the star is tallied without drawing; without, its draws decide only the membership.
std::optional<photometry::Category> categoryOfEveryDraw(const StarDrawInputs& star, float nearest_modulus_mag,
                                                        float farthest_modulus_mag,
                                                        const photometry::ClassGrid& grid,
                                                        float largest_deviate) {
    constexpr int kQuantiles = PreparedSample::kQuantiles;
    if (star.fixed != PreparedSample::kDrawnCategory) {
        return star.fixed;
    }
    if (star.tabulated != nullptr) {
        const bool same = std::all_of(star.tabulated, star.tabulated + kQuantiles,
                                      [&](photometry::Category c) { return c == star.tabulated[0]; });
        return same ? std::optional(star.tabulated[0]) : std::nullopt;
    }
    if (!std::isfinite(star.g_mag)) {
        return kUnclassified;
    }
    // Float rounding in the loop can move a value by a few ulps past these bounds: widen them.
    constexpr float kMarginMag = 1e-3f;
    const float g_reach = star.g_error_mag * largest_deviate + kMarginMag;
    const float magnitude_low = star.g_mag - g_reach - farthest_modulus_mag;
    const float magnitude_high = star.g_mag + g_reach - nearest_modulus_mag;
    if (!std::isfinite(star.colour_mag)) {
        return grid.uniformMagnitudeOnlyCategory(magnitude_low, magnitude_high);
    }
    const float colour_reach = star.colour_error_mag * largest_deviate + kMarginMag;
    return grid.uniformCategory(star.colour_mag - colour_reach, star.colour_mag + colour_reach, magnitude_low,
                                magnitude_high);
}

} // namespace

/// The draws' tallies while they are made: per worker thread, the counts [draw][radius][category] (as
/// DrawTallies) and, per [radius][category], the stars tallied without drawing; the per-star class counts
/// are shared (one thread sets each block's stars). finish() sums the threads' parts.
struct DrawAccumulators {
    DrawAccumulators(std::size_t stars, std::size_t radii, const DrawSettings& settings, unsigned threads)
        : counts(threads,
                 std::vector<std::uint32_t>(
                     static_cast<std::size_t>(settings.draws) * radii * photometry::kCategoryCount, 0)),
          certain(threads, std::vector<std::uint32_t>(radii * photometry::kCategoryCount, 0)) {
        tallies.draws = settings.draws;
        tallies.radii = radii;
        if (settings.per_star_classes) {
            tallies.star_classes = StarClassCounts(stars, settings.draws);
        }
    }

    DrawTallies finish() {
        tallies.counts.assign(counts.front().size(), 0);
        for (const auto& partial : counts) {
            std::transform(partial.begin(), partial.end(), tallies.counts.begin(), tallies.counts.begin(),
                           std::plus<>());
        }
        const auto draws = static_cast<std::size_t>(tallies.draws);
        for (const auto& certain_counts : certain) {
            for (std::size_t slot = 0; slot < certain_counts.size(); ++slot) {
                if (certain_counts[slot] != 0) {
                    std::uint32_t* run = &tallies.counts[slot * draws];
                    std::for_each(run, run + draws,
                                  [&](std::uint32_t& count) { count += certain_counts[slot]; });
                }
            }
        }
        return std::move(tallies);
    }

    std::vector<std::vector<std::uint32_t>> counts;  // [thread]
    std::vector<std::vector<std::uint32_t>> certain; // [thread]
    DrawTallies tallies;
};

/// The hot loop, with access to PreparedSample's arrays: the draws of stars [begin, end) of a sample, from
/// its draw tables (run()), or of one star at a time while the sample is prepared (prepareAndDraw).
class SampleDrawer {
  public:
    /// A prepared star's draw inputs, with its quantile and category tables (either may be nullptr).
    static StarDrawInputs inputsOf(const PreparedSample::DrawnStar& star, const float* quantiles,
                                   const photometry::Category* tabulated) {
        return {quantiles,        tabulated,       star.fixed,           star.g_mag,
                star.g_error_mag, star.colour_mag, star.colour_error_mag};
    }

    SampleDrawer(const PreparedSample& sample, const photometry::ClassGrid& classes,
                 const DrawSettings& settings, std::size_t begin, std::size_t end)
        : sample_(sample), classes_(classes), settings_(settings), begin_(begin), end_(end) {
        sample.requireDrawTables("drawSample");
    }

    DrawTallies run() const {
        const unsigned threads = resolveThreadCount(settings_.threads);
        const std::size_t stars = end_ - begin_;
        DrawAccumulators accumulators(stars, sample_.radii_pc_.size(), settings_, threads);
        startProgress();
        forEachBlock(stars, threads, [&](std::size_t begin, std::size_t end, unsigned t) {
            drawBlock(begin_ + begin, begin_ + end, t, accumulators);
            blockDone(end - begin);
        });
        return accumulators.finish();
    }

    void startProgress() const {
        if (settings_.progress != nullptr) {
            settings_.progress->items_total = static_cast<std::int64_t>(end_ - begin_) * settings_.draws;
        }
    }

    void blockDone(std::size_t stars) const {
        if (settings_.progress != nullptr) {
            settings_.progress->items_done.fetch_add(static_cast<std::int64_t>(stars) * settings_.draws,
                                                     std::memory_order_relaxed);
        }
    }

    /// Star s tallied without drawing: every draw gives `category`, and each radius counts the star in every
    /// draw or in none (the numbers the draws would give).
    void tallyCertain(std::size_t s, photometry::Category category, unsigned thread,
                      DrawAccumulators& accumulators) const {
        const std::size_t radii = sample_.radii_pc_.size();
        const float* within = &sample_.probability_within_[s * radii];
        std::vector<std::uint32_t>& certain_counts = accumulators.certain[thread];
        for (std::size_t r = 0; r < radii; ++r) {
            certain_counts[r * photometry::kCategoryCount + category] += within[r] >= 1.0f ? 1u : 0u;
        }
        keepSingleClass(s, category, accumulators);
    }

    /// Star s's draws, from its own random stream. A star of fixed category (star.quantiles may then be
    /// nullptr) draws only its membership, from the same numbers of the stream as the full draw.
    void drawStar(std::size_t s, const StarDrawInputs& star, unsigned thread,
                  DrawAccumulators& accumulators) const {
        const std::size_t radii = sample_.radii_pc_.size();
        constexpr float kQuantileSteps = PreparedSample::kQuantiles - 1;
        // The star's own stream: a star tallied without drawing leaves the others' draws unchanged.
        Xoshiro256 random(settings_.seed, sample_.stream_rows_.empty() ? s : sample_.stream_rows_[s]);
        const float* within = &sample_.probability_within_[s * radii];
        std::array<std::uint32_t, photometry::kClassCount> classes_seen{};
        const auto draws = static_cast<std::size_t>(settings_.draws);
        std::vector<std::uint32_t>& counts = accumulators.counts[thread];
        // Draw d's count of the star in `category` at each radius whose membership probability exceeds u.
        const auto countMember = [&](photometry::Category category, std::size_t d, float u) {
            std::uint32_t* draw_counts = &counts[category * draws + d];
            for (std::size_t r = 0; r < radii; ++r) {
                draw_counts[r * photometry::kCategoryCount * draws] += u < within[r] ? 1u : 0u;
            }
        };
        // 24 bits of u: the same u decides membership (u < P(d < R), exact) and the distance modulus
        // (quantile function at u), so both come from one consistent distance.
        const auto uniform = [](std::uint64_t bits) { return static_cast<float>(bits >> 40) * 0x1.0p-24f; };
        if (star.fixed != PreparedSample::kDrawnCategory) {
            for (std::size_t d = 0; d < draws; ++d) {
                const float u = uniform(random());
                random(); // the photometry's bits, unread: the next draw takes the full loop's numbers
                countMember(star.fixed, d, u);
            }
            keepSingleClass(s, star.fixed, accumulators);
            return;
        }
        const bool has_colour = std::isfinite(star.colour_mag);
        const bool has_magnitude = std::isfinite(star.g_mag);
        const float* quantiles = star.quantiles;
        for (std::size_t d = 0; d < draws; ++d) {
            const float u = uniform(random());
            const std::uint64_t bits_photometry = random();
            const float position = u * kQuantileSteps;
            const int node = std::min(static_cast<int>(position), PreparedSample::kQuantiles - 2);
            const float modulus = quantiles[node] + (position - static_cast<float>(node)) *
                                                        (quantiles[node + 1] - quantiles[node]);
            const float abs_g = star.g_mag +
                                star.g_error_mag * normal_(static_cast<std::uint32_t>(bits_photometry)) -
                                modulus;
            photometry::Category assigned = kUnclassified;
            if (star.tabulated != nullptr) {
                assigned = star.tabulated[static_cast<int>(position + 0.5f)];
            } else if (has_colour && has_magnitude) {
                const float drawn_colour =
                    star.colour_mag +
                    star.colour_error_mag * normal_(static_cast<std::uint32_t>(bits_photometry >> 32));
                assigned = classes_.lookup(drawn_colour, abs_g);
            } else if (has_magnitude) {
                assigned = classes_.lookupMagnitudeOnly(abs_g);
            }
            ++classes_seen[static_cast<std::size_t>(photometry::classOfCategory(assigned))];
            countMember(assigned, d, u);
        }
        keepClasses(s, classes_seen, accumulators.tallies.star_classes);
    }

  private:
    void drawBlock(std::size_t begin, std::size_t end, unsigned thread,
                   DrawAccumulators& accumulators) const {
        const std::size_t radii = sample_.radii_pc_.size();
        std::array<float, PreparedSample::kQuantiles> refilled_quantiles; // the star's table
        const bool certainty_known = !sample_.certain_categories_.empty();
        for (std::size_t s = begin; s < end; ++s) {
            if (certainty_known && sample_.certain_categories_[s] != PreparedSample::kDrawnCategory) {
                tallyCertain(s, sample_.certain_categories_[s], thread, accumulators);
                continue;
            }
            // Without a grid in the sample every star is drawn, and tested for certainty here.
            const PreparedSample::BlockTables& tables = sample_.block_tables_[s / kBlockStars];
            const PreparedSample::DrawnStar& star = tables.drawn[sample_.drawn_row_[s]];
            // A fixed category needs no distance modulus, and keeps no table.
            StarDrawInputs inputs =
                inputsOf(star,
                         star.fixed == PreparedSample::kDrawnCategory
                             ? sample_.quantileTable(tables, star, refilled_quantiles)
                             : nullptr,
                         star.categories == PreparedSample::kNoRow
                             ? nullptr
                             : &tables.categories[star.categories * PreparedSample::kQuantiles]);
            if (!certainty_known) {
                float nearest = 0.0f; // read only for a drawn category, which has a table
                float farthest = 0.0f;
                if (inputs.quantiles != nullptr) {
                    const auto [low, high] =
                        std::minmax_element(inputs.quantiles, inputs.quantiles + PreparedSample::kQuantiles);
                    nearest = *low;
                    farthest = *high;
                }
                if (const auto category = categoryOfEveryDraw(inputs, nearest, farthest, classes_,
                                                              normal_.largestMagnitude())) {
                    if (membershipCertain({&sample_.probability_within_[s * radii], radii})) {
                        tallyCertain(s, *category, thread, accumulators);
                        continue;
                    }
                    inputs.fixed = *category;
                }
            }
            drawStar(s, inputs, thread, accumulators);
        }
    }

    /// Star s's class frequencies when every draw gave `category`.
    void keepSingleClass(std::size_t s, photometry::Category category, DrawAccumulators& accumulators) const {
        std::array<std::uint32_t, photometry::kClassCount> classes_seen{};
        classes_seen[static_cast<std::size_t>(photometry::classOfCategory(category))] =
            static_cast<std::uint32_t>(settings_.draws);
        keepClasses(s, classes_seen, accumulators.tallies.star_classes);
    }

    /// Star s's class frequencies into star_classes, unless the settings ask for none.
    void keepClasses(std::size_t s, const std::array<std::uint32_t, photometry::kClassCount>& classes_seen,
                     StarClassCounts& star_classes) const {
        if (settings_.per_star_classes) {
            star_classes.set(s - begin_, classes_seen);
        }
    }

    const PreparedSample& sample_;
    const photometry::ClassGrid& classes_;
    const DrawSettings& settings_;
    std::size_t begin_, end_; // the stars drawn
    detail::FastNormal normal_;
};

PreparedSample::PreparedSample(std::span<const photometry::CatalogRow> rows, std::vector<double> radii_pc,
                               const MembershipSettings& membership, const RowClassRules& rules,
                               unsigned threads, const photometry::Classifier* classifier,
                               const photometry::ClassGrid* grid)
    : PreparedSample(rows, {}, std::move(radii_pc), membership, rules, threads, classifier, grid) {}

PreparedSample::PreparedSample(std::span<const photometry::CatalogRow> rows,
                               std::span<const std::uint32_t> order, std::vector<double> radii_pc,
                               const MembershipSettings& membership, const RowClassRules& rules,
                               unsigned threads, const photometry::Classifier* classifier,
                               const photometry::ClassGrid* grid)
    : PreparedSample(rows, order, std::move(radii_pc), membership, rules, threads, classifier, grid, nullptr,
                     nullptr) {}

PreparedSample::PreparedSample(std::span<const photometry::CatalogRow> rows,
                               std::span<const std::uint32_t> order, std::vector<double> radii_pc,
                               const MembershipSettings& membership, const RowClassRules& rules,
                               unsigned threads, const photometry::Classifier* classifier,
                               const photometry::ClassGrid* grid, const DrawSettings* draw_now,
                               DrawTallies* tallies)
    : stars_(order.empty() ? rows.size() : order.size()), radii_pc_(std::move(radii_pc)),
      membership_(membership), stream_rows_(order.begin(), order.end()), grid_(grid) {
    const std::size_t n = stars_;
    const std::size_t radii = radii_pc_.size();
    probability_within_.resize(n * radii);
    if (draw_now == nullptr) {
        drawn_row_.assign(n, kNoRow);
        if (grid != nullptr) {
            certain_categories_.assign(n, kDrawnCategory);
        }
        block_tables_.resize((n + kBlockStars - 1) / kBlockStars);
    }
    const float largest_deviate = detail::FastNormal().largestMagnitude();
    std::optional<SampleDrawer> drawer;
    std::optional<DrawAccumulators> accumulators;
    if (draw_now != nullptr) {
        threads = resolveThreadCount(threads);
        drawer.emplace(*this, *grid, *draw_now, 0, n);
        accumulators.emplace(n, radii, *draw_now, threads);
        drawer->startProgress();
    }
    forEachBlock(n, threads, [&](std::size_t begin, std::size_t end, unsigned thread) {
        BlockTables* tables = drawer ? nullptr : &block_tables_[begin / kBlockStars]; // none when drawing now
        std::array<photometry::Category, kQuantiles> categories;
        for (std::size_t s = begin; s < end; ++s) {
            const photometry::CatalogRow& row = order.empty() ? rows[s] : rows[order[s]];
            const bool classifiable =
                row.parallax_mas >= rules.min_parallax_snr_to_classify * row.parallax_error_mas;
            DrawnStar star;
            if (classifier != nullptr && usesLiteratureType(row, rules)) {
                star.fixed = photometry::censusCategory(classifyRow(row, *classifier, rules));
            } else if (!classifiable) {
                star.fixed = photometry::unclassifiedCategory(photometry::UnclassifiedReason::LowParallaxSnr);
            } else if (!photometry::hasClassifiableBands(photometry::photometricInput(row))) {
                star.fixed = photometry::unclassifiedCategory(photometry::UnclassifiedReason::NoPhotometry);
            }
            star.g_mag = static_cast<float>(row.g_mag);
            star.g_error_mag = finiteOrZero(row.g_error_mag);
            star.colour_mag = static_cast<float>(row.bp_mag - row.rp_mag);
            star.colour_error_mag =
                quadratureSum(finiteOrZero(row.bp_error_mag), finiteOrZero(row.rp_error_mag));
            // The quantile table only where it is read: a star whose every draw is known keeps none.
            DistancePosterior posterior(row.parallax_mas, row.parallax_error_mas, membership,
                                        DistancePosterior::Quantiles::Deferred);
            float* within = &probability_within_[s * radii];
            for (std::size_t r = 0; r < radii; ++r) {
                within[r] = static_cast<float>(posterior.probabilityWithin(radii_pc_[r]));
            }
            const bool tabulated =
                classifier != nullptr && star.fixed == kDrawnCategory &&
                (std::isnan(star.colour_mag) || misnamedByGrid(row, *classifier, grid, rules));
            if (tabulated) {
                posterior.tabulateQuantiles();
                // The row's bands as sample.fits uses them (photometricInput), at each distance.
                classifier->censusCategoriesAt(photometry::photometricInput(row),
                                               posterior.distanceModulusQuantiles(), categories);
            }
            if (grid != nullptr) {
                const StarDrawInputs inputs =
                    SampleDrawer::inputsOf(star, nullptr, tabulated ? categories.data() : nullptr);
                if (const auto category =
                        categoryOfEveryDraw(inputs, posterior.nearestModulus(), posterior.farthestModulus(),
                                            *grid, largest_deviate)) {
                    if (membershipCertain({within, radii})) {
                        if (drawer) {
                            drawer->tallyCertain(s, *category, thread, *accumulators);
                        } else {
                            certain_categories_[s] = *category;
                        }
                        continue; // every draw is known: no tables
                    }
                    star.fixed = *category; // the draws decide the membership alone
                }
            }
            // A star of fixed category draws its membership alone: it keeps no quantile or category table.
            const bool keeps_tables = star.fixed == kDrawnCategory;
            if (drawer) {
                if (keeps_tables) {
                    posterior.tabulateQuantiles();
                }
                drawer->drawStar(s,
                                 SampleDrawer::inputsOf(
                                     star,
                                     keeps_tables ? posterior.distanceModulusQuantiles().data() : nullptr,
                                     keeps_tables && tabulated ? categories.data() : nullptr),
                                 thread, *accumulators);
                continue;
            }
            if (!keeps_tables) {
                star.posterior = kNoRow;
            } else if (const auto gaussian = posterior.gaussianForm()) {
                star.posterior = kGaussianRow | static_cast<std::uint32_t>(tables->gaussians.size());
                tables->gaussians.push_back(*gaussian);
            } else {
                star.posterior = static_cast<std::uint32_t>(tables->gridded.size());
                tables->gridded.push_back({row.parallax_mas, row.parallax_error_mas});
            }
            if (tabulated && keeps_tables) {
                star.categories = static_cast<std::uint32_t>(tables->categories.size() / kQuantiles);
                tables->categories.insert(tables->categories.end(), categories.begin(), categories.end());
            }
            drawn_row_[s] = static_cast<std::uint32_t>(tables->drawn.size());
            tables->drawn.push_back(star);
        }
        if (drawer) {
            drawer->blockDone(end - begin);
            return;
        }
        // Reserve-free growth leaves up to twice the room: give it back.
        tables->drawn.shrink_to_fit();
        tables->gridded.shrink_to_fit();
        tables->gaussians.shrink_to_fit();
        tables->categories.shrink_to_fit();
    });
    if (drawer) {
        *tallies = accumulators->finish();
        releaseDrawTables();
    }
}

DrawnSample prepareAndDraw(std::span<const photometry::CatalogRow> rows, std::vector<double> radii_pc,
                           const MembershipSettings& membership, const RowClassRules& rules,
                           const photometry::Classifier& classifier, const photometry::ClassGrid& grid,
                           const DrawSettings& settings) {
    DrawTallies tallies;
    PreparedSample sample(rows, {}, std::move(radii_pc), membership, rules, settings.threads, &classifier,
                          &grid, &settings, &tallies);
    return {std::move(sample), std::move(tallies)};
}

PreparedSample::PreparedSample(const PreparedSample& source, std::span<const std::uint32_t> order)
    : stars_(order.size()), radii_pc_(source.radii_pc_), membership_(source.membership_),
      grid_(source.grid_) {
    source.requireDrawTables("selecting stars from a PreparedSample");
    const std::size_t n = order.size();
    const std::size_t radii = radii_pc_.size();
    const auto select = [&](const auto& from, auto& to) {
        to.resize(n);
        for (std::size_t s = 0; s < n; ++s) {
            to[s] = from[order[s]];
        }
    };
    if (source.stream_rows_.empty()) {
        stream_rows_.assign(order.begin(), order.end());
    } else {
        select(source.stream_rows_, stream_rows_);
    }
    if (!source.certain_categories_.empty()) {
        select(source.certain_categories_, certain_categories_);
    }
    probability_within_.resize(n * radii);
    drawn_row_.assign(n, kNoRow);
    block_tables_.resize((n + kBlockStars - 1) / kBlockStars);
    for (std::size_t s = 0; s < n; ++s) {
        const std::size_t from = order[s];
        std::copy_n(&source.probability_within_[from * radii], radii, &probability_within_[s * radii]);
        if (source.drawn_row_[from] == kNoRow) {
            continue;
        }
        const BlockTables& source_tables = source.block_tables_[from / kBlockStars];
        BlockTables& tables = block_tables_[s / kBlockStars];
        DrawnStar star = source_tables.drawn[source.drawn_row_[from]];
        if (star.posterior != kNoRow) { // kNoRow: a fixed category, without a table
            if ((star.posterior & kGaussianRow) != 0) {
                tables.gaussians.push_back(source_tables.gaussians[star.posterior & ~kGaussianRow]);
                star.posterior = kGaussianRow | static_cast<std::uint32_t>(tables.gaussians.size() - 1);
            } else {
                tables.gridded.push_back(source_tables.gridded[star.posterior]);
                star.posterior = static_cast<std::uint32_t>(tables.gridded.size() - 1);
            }
        }
        if (star.categories != kNoRow) {
            const auto first =
                source_tables.categories.begin() + static_cast<std::ptrdiff_t>(star.categories * kQuantiles);
            star.categories = static_cast<std::uint32_t>(tables.categories.size() / kQuantiles);
            tables.categories.insert(tables.categories.end(), first, first + kQuantiles);
        }
        drawn_row_[s] = static_cast<std::uint32_t>(tables.drawn.size());
        tables.drawn.push_back(star);
    }
    for (BlockTables& tables : block_tables_) {
        tables.drawn.shrink_to_fit();
        tables.gridded.shrink_to_fit();
        tables.gaussians.shrink_to_fit();
        tables.categories.shrink_to_fit();
    }
}

std::uint32_t DrawTallies::classCount(int draw, std::size_t r, photometry::StellarClass c) const {
    std::uint32_t total = 0;
    for (std::size_t category = 0; category < photometry::kCategoryCount; ++category) {
        if (photometry::classOfCategory(static_cast<photometry::Category>(category)) == c) {
            total += count(draw, r, static_cast<photometry::Category>(category));
        }
    }
    return total;
}

void PreparedSample::releaseDrawTables() {
    const auto release = [](auto& vector) { std::remove_reference_t<decltype(vector)>().swap(vector); };
    release(stream_rows_);
    release(block_tables_);
    release(drawn_row_);
    release(certain_categories_);
    draw_tables_released_ = true;
}

const float* PreparedSample::quantileTable(const BlockTables& tables, const DrawnStar& star,
                                           std::array<float, kQuantiles>& scratch) const {
    if ((star.posterior & kGaussianRow) != 0) {
        tables.gaussians[star.posterior & ~kGaussianRow].fillQuantiles(scratch);
    } else {
        const GridPosteriorInputs& inputs = tables.gridded[star.posterior];
        scratch = DistancePosterior(inputs.parallax_mas, inputs.parallax_error_mas, membership_)
                      .distanceModulusQuantiles();
    }
    return scratch.data();
}

void PreparedSample::requireDrawTables(const char* what) const {
    if (draw_tables_released_) {
        throw std::logic_error(std::string(what) + ": its draw tables were released");
    }
}

StarClassCounts::StarClassCounts(std::size_t stars, int draws)
    : draws_(draws), only_class_(stars, kNone), mixed_slot_(stars, 0),
      chunks_((stars + kChunkStars - 1) / kChunkStars) {}

void StarClassCounts::set(std::size_t star, const Counters& counts) {
    const auto counted = std::count_if(counts.begin(), counts.end(), [](std::uint32_t n) { return n > 0; });
    if (counted == 0) {
        only_class_[star] = kNone;
        return;
    }
    const auto first = std::find_if(counts.begin(), counts.end(), [](std::uint32_t n) { return n > 0; });
    if (counted == 1 && *first == static_cast<std::uint32_t>(draws_)) {
        only_class_[star] = static_cast<std::uint8_t>(first - counts.begin());
        return;
    }
    std::vector<Counters>& chunk = chunks_[star / kChunkStars];
    only_class_[star] = kMixed;
    mixed_slot_[star] = static_cast<std::uint8_t>(chunk.size()); // at most kChunkStars per chunk
    chunk.push_back(counts);
}

void StarClassCounts::append(const StarClassCounts& more) {
    if (empty()) {
        *this = more;
        return;
    }
    const std::size_t first = size();
    only_class_.resize(first + more.size(), kNone);
    mixed_slot_.resize(first + more.size(), 0);
    chunks_.resize((size() + kChunkStars - 1) / kChunkStars);
    Counters counts;
    for (std::size_t s = 0; s < more.size(); ++s) {
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            counts[c] = more.draws(s, static_cast<photometry::StellarClass>(c));
        }
        set(first + s, counts);
    }
}

bool StarClassCounts::operator==(const StarClassCounts& other) const {
    if (size() != other.size() || draws_ != other.draws_) {
        return false;
    }
    for (std::size_t s = 0; s < size(); ++s) {
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            const auto stellar_class = static_cast<photometry::StellarClass>(c);
            if (draws(s, stellar_class) != other.draws(s, stellar_class)) {
                return false;
            }
        }
    }
    return true;
}

double PreparedSample::expectedCount(std::size_t r) const {
    double sum = 0.0;
    for (std::size_t s = 0; s < size(); ++s) {
        sum += probabilityWithin(s, r);
    }
    return sum;
}

DrawTallies drawSample(const PreparedSample& sample, const photometry::ClassGrid& classes,
                       const DrawSettings& settings) {
    return drawSample(sample, classes, settings, 0, sample.size());
}

DrawTallies drawSample(const PreparedSample& sample, const photometry::ClassGrid& classes,
                       const DrawSettings& settings, std::size_t begin, std::size_t end) {
    if (sample.grid() != nullptr && sample.grid() != &classes) {
        throw std::invalid_argument("drawSample: the sample was prepared with another class grid");
    }
    return SampleDrawer(sample, classes, settings, begin, end).run();
}

void appendTallies(DrawTallies& into, const DrawTallies& more) {
    std::transform(into.counts.begin(), into.counts.end(), more.counts.begin(), into.counts.begin(),
                   std::plus<>());
    into.star_classes.append(more.star_classes);
}

} // namespace starcensus::census
