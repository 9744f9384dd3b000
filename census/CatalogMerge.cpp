#include "census/CatalogMerge.h"

#include "census/detail/PairSearch.h"
#include "census/detail/SkyGeometry.h"

#include "photometry/base/Threads.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <numbers>
#include <numeric>
#include <span>
#include <unordered_map>
#include <utility>

namespace starcensus::census {

namespace {

using detail::findRoot;
using photometry::CatalogRow;

using detail::kArcsecPerRadian;
using detail::kRadiansPerDegree;
using detail::kRadiansPerMas;
using detail::neighbourGrid;
using detail::separationRadians;
using detail::toPointing;
using detail::UnitVector;

UnitVector unitVector(SkyPosition position) {
    return detail::unitVectorOf(position.ra_deg, position.dec_deg);
}

/// Better measurement of one quantity: a value beats a missing one, a value with an error beats one
/// without, then the smaller error; on a tie the current (earlier) one stays.
bool measuresBetter(double value, double error, double current_value, double current_error) {
    if (std::isnan(value)) {
        return false;
    }
    if (std::isnan(current_value)) {
        return true;
    }
    const bool has_error = std::isfinite(error) && error > 0.0;
    const bool current_has_error = std::isfinite(current_error) && current_error > 0.0;
    return has_error && (!current_has_error || error < current_error);
}

struct Band {
    photometry::RowMember value;
    photometry::RowMember error;
};
constexpr std::array<Band, 11> kBands = {{{&CatalogRow::g_mag, &CatalogRow::g_error_mag},
                                          {&CatalogRow::bp_mag, &CatalogRow::bp_error_mag},
                                          {&CatalogRow::rp_mag, &CatalogRow::rp_error_mag},
                                          {&CatalogRow::j_mag, &CatalogRow::j_error_mag},
                                          {&CatalogRow::h_mag, &CatalogRow::h_error_mag},
                                          {&CatalogRow::ks_mag, &CatalogRow::ks_error_mag},
                                          {&CatalogRow::b_mag, &CatalogRow::b_error_mag},
                                          {&CatalogRow::v_mag, &CatalogRow::v_error_mag},
                                          {&CatalogRow::w1_mag, &CatalogRow::w1_error_mag},
                                          {&CatalogRow::w2_mag, &CatalogRow::w2_error_mag},
                                          {&CatalogRow::parallax_mas, &CatalogRow::parallax_error_mas}}};

int literatureRank(photometry::LiteratureTypeStatus status) {
    switch (status) {
    case photometry::LiteratureTypeStatus::Parsed:
        return 2;
    case photometry::LiteratureTypeStatus::Refused:
        return 1;
    case photometry::LiteratureTypeStatus::Absent:
        break;
    }
    return 0;
}

/// Folds a later row into an object's row by the rules of mergeCatalogRows(); kept_epoch_yr is the
/// epoch of the kept row's position, which changes with the astrometry.
void absorb(CatalogRow& kept, double& kept_epoch_yr, const CatalogRow& other, double other_epoch_yr) {
    if (measuresBetter(other.parallax_mas, other.parallax_error_mas, kept.parallax_mas,
                       kept.parallax_error_mas)) {
        // One astrometric solution: position, proper motion and RUWE go with the parallax.
        kept.ra_deg = other.ra_deg;
        kept.dec_deg = other.dec_deg;
        kept.pmra_mas_per_yr = other.pmra_mas_per_yr;
        kept.pmdec_mas_per_yr = other.pmdec_mas_per_yr;
        kept.ruwe = other.ruwe;
        kept_epoch_yr = other_epoch_yr;
    }
    for (const Band& band : kBands) {
        if (measuresBetter(band.value.get(other), band.error.get(other), band.value.get(kept),
                           band.error.get(kept))) {
            band.value.set(kept, band.value.get(other));
            band.error.set(kept, band.error.get(other));
        }
    }
    if (literatureRank(other.literature_status) > literatureRank(kept.literature_status)) {
        kept.literature_code = other.literature_code;
        kept.literature_class = other.literature_class;
        kept.literature_status = other.literature_status;
    }
    if (kept.source_id == photometry::kMissingSourceId) {
        kept.source_id = other.source_id;
    }
    if (std::isnan(kept.literature_components)) {
        kept.literature_components = other.literature_components;
    }
}

bool parallaxesConsistent(const CatalogRow& a, const CatalogRow& b, double sigma) {
    const double combined_error = std::hypot(a.parallax_error_mas, b.parallax_error_mas);
    if (std::isnan(a.parallax_mas) || std::isnan(b.parallax_mas) || !(combined_error > 0.0)) {
        return true; // nothing to compare: matched by position alone
    }
    return std::abs(a.parallax_mas - b.parallax_mas) <= sigma * combined_error;
}

/// The input files each object's rows came from. Nearly every object has one file, kept in a plain
/// array; the few with more (after a merge) keep a sorted list on the side.
class FileSets {
  public:
    void addObject(std::uint32_t file) { single_.push_back(file); }
    /// Adds `file` to the object's files (no effect if it is there already).
    void add(std::uint32_t object, std::uint32_t file) {
        if (file == single_[object] && !several_.contains(object)) {
            return;
        }
        std::vector<std::uint32_t>& list = listOf(object);
        const auto place = std::lower_bound(list.begin(), list.end(), file);
        if (place == list.end() || *place != file) {
            list.insert(place, file);
        }
    }
    bool disjoint(std::uint32_t a, std::uint32_t b) const {
        const auto ia = several_.find(a);
        const auto ib = several_.find(b);
        if (ia == several_.end() && ib == several_.end()) {
            return single_[a] != single_[b];
        }
        const std::span<const std::uint32_t> fa =
            ia == several_.end() ? std::span(&single_[a], 1) : std::span(ia->second);
        const std::span<const std::uint32_t> fb =
            ib == several_.end() ? std::span(&single_[b], 1) : std::span(ib->second);
        auto i = fa.begin();
        auto j = fb.begin();
        while (i != fa.end() && j != fb.end()) {
            if (*i == *j) {
                return false;
            }
            *i < *j ? ++i : ++j;
        }
        return true;
    }
    /// The files of `child` join those of `root`.
    void join(std::uint32_t root, std::uint32_t child) {
        const auto it = several_.find(child);
        if (it == several_.end()) {
            add(root, single_[child]);
            return;
        }
        const std::vector<std::uint32_t> child_files = std::move(it->second);
        several_.erase(it);
        for (const std::uint32_t file : child_files) {
            add(root, file);
        }
    }

  private:
    std::vector<std::uint32_t>& listOf(std::uint32_t object) {
        const auto [it, inserted] = several_.try_emplace(object);
        if (inserted) {
            it->second.push_back(single_[object]);
        }
        return it->second;
    }
    std::vector<std::uint32_t> single_;                                     // the first file of each object
    std::unordered_map<std::uint32_t, std::vector<std::uint32_t>> several_; // objects with more files
};

struct CandidatePair {
    double separation_rad;
    std::uint32_t a; // objects, a < b
    std::uint32_t b;
    auto operator<=>(const CandidatePair&) const = default;
};

/// Pairs of objects from disjoint files within the radius, nearest first; counts the pairs the parallax
/// test refused.
std::vector<CandidatePair> positionalPairs(const std::vector<CatalogRow>& rows,
                                           const std::vector<std::uint32_t>& object_rows,
                                           const FileSets& files, const std::vector<UnitVector>& positions,
                                           const CatalogMergeSettings& settings, unsigned threads,
                                           std::int64_t& refused_by_parallax) {
    const double radius_rad = settings.match_radius_arcsec / kArcsecPerRadian;
    const auto grid = neighbourGrid(radius_rad);
    // Objects sorted by pixel: a disc query's pixel ranges become ranges of this list. Objects without a
    // position (NaN ra or dec) are left out: they match nothing.
    std::vector<std::pair<std::int64_t, std::uint32_t>> by_pixel;
    by_pixel.reserve(object_rows.size());
    for (std::size_t i = 0; i < object_rows.size(); ++i) {
        const UnitVector& u = positions[i];
        if (std::isfinite(u.x) && std::isfinite(u.y) && std::isfinite(u.z)) {
            by_pixel.emplace_back(grid.vec2pix(vec3(u.x, u.y, u.z)), static_cast<std::uint32_t>(i));
        }
    }
    std::sort(by_pixel.begin(), by_pixel.end());
    const unsigned workers = resolveThreadCount(threads);
    std::vector<std::vector<CandidatePair>> found(workers);
    std::vector<std::int64_t> refused(workers, 0);
    // Queries in pixel order: neighbouring queries read neighbouring parts of by_pixel.
    forEachIndex(by_pixel.size(), threads, [&](std::size_t k, unsigned worker) {
        const std::size_t i = by_pixel[k].second;
        rangeset<std::int64_t> pixels;
        grid.query_disc_inclusive(toPointing(positions[i]), radius_rad, pixels);
        for (std::size_t r = 0; r < pixels.nranges(); ++r) {
            auto it = std::lower_bound(by_pixel.begin(), by_pixel.end(),
                                       std::pair<std::int64_t, std::uint32_t>{pixels.ivbegin(r), 0});
            for (; it != by_pixel.end() && it->first < pixels.ivend(r); ++it) {
                const std::uint32_t j = it->second;
                if (j <= i || !files.disjoint(static_cast<std::uint32_t>(i), j)) {
                    continue; // each pair once; never two rows of one file
                }
                const double separation = separationRadians(positions[i], positions[j]);
                if (separation > radius_rad) {
                    continue;
                }
                if (!parallaxesConsistent(rows[object_rows[i]], rows[object_rows[j]],
                                          settings.parallax_consistency_sigma)) {
                    ++refused[worker];
                    continue;
                }
                found[worker].push_back({separation, static_cast<std::uint32_t>(i), j});
            }
        }
    });
    std::vector<CandidatePair> pairs = detail::joinParts(found);
    std::sort(pairs.begin(), pairs.end()); // nearest first; ties by index: independent of threads
    refused_by_parallax = std::accumulate(refused.begin(), refused.end(), std::int64_t{0});
    return pairs;
}

/// Union of the pairs, nearest first, as long as a group's files stay disjoint: each group's root is its
/// lowest (earliest) object.
std::vector<std::uint32_t> groupByPosition(const std::vector<CandidatePair>& pairs, std::size_t objects,
                                           FileSets files) {
    std::vector<std::uint32_t> parent(objects);
    std::iota(parent.begin(), parent.end(), 0u);
    for (const CandidatePair& pair : pairs) {
        const std::uint32_t a = findRoot(parent, pair.a);
        const std::uint32_t b = findRoot(parent, pair.b);
        if (a == b || !files.disjoint(a, b)) {
            continue;
        }
        const auto [root, child] = std::minmax(a, b);
        parent[child] = root;
        files.join(root, child);
    }
    for (std::uint32_t i = 0; i < parent.size(); ++i) {
        parent[i] = findRoot(parent, i);
    }
    return parent;
}

double fileEpoch(const CatalogMergeSettings& settings, std::uint32_t file_index) {
    if (file_index < settings.file_epochs_yr.size() && !std::isnan(settings.file_epochs_yr[file_index])) {
        return settings.file_epochs_yr[file_index];
    }
    return settings.default_epoch_yr;
}

void countMerge(std::map<std::pair<std::uint32_t, std::uint32_t>, FilePairMerges>& pairs,
                std::uint32_t kept_file, std::uint32_t absorbed_file, MergeKind kind) {
    const auto [a, b] = std::minmax(kept_file, absorbed_file);
    FilePairMerges& counts = pairs[{a, b}];
    counts.file_a = a;
    counts.file_b = b;
    ++(kind == MergeKind::SourceId ? counts.by_source_id : counts.by_position);
}

} // namespace

SkyPosition positionAtEpoch(const CatalogRow& row, double from_epoch_yr, double to_epoch_yr) {
    const SkyPosition position{row.ra_deg, row.dec_deg};
    if (std::isnan(row.pmra_mas_per_yr) || std::isnan(row.pmdec_mas_per_yr) || from_epoch_yr == to_epoch_yr) {
        return position;
    }
    // Straight-line space motion with zero radial velocity: the direction u + t (pmra p + pmdec q),
    // normalised, with p and q the unit vectors towards east and north (ESA 1997, The Hipparcos and
    // Tycho Catalogues, vol. 1, sec. 1.5.5, without the radial term; from memory). Distance cancels.
    // Checked against astropy's apply_space_motion in tests/census/CatalogMergeTest.cpp.
    const double ra = row.ra_deg * kRadiansPerDegree;
    const double dec = row.dec_deg * kRadiansPerDegree;
    const UnitVector u = unitVector(position);
    const UnitVector p{-std::sin(ra), std::cos(ra), 0.0};
    const UnitVector q{-std::sin(dec) * std::cos(ra), -std::sin(dec) * std::sin(ra), std::cos(dec)};
    const double years = to_epoch_yr - from_epoch_yr;
    const double east = row.pmra_mas_per_yr * kRadiansPerMas * years;
    const double north = row.pmdec_mas_per_yr * kRadiansPerMas * years;
    const double x = u.x + east * p.x + north * q.x;
    const double y = u.y + east * p.y + north * q.y;
    const double z = u.z + east * p.z + north * q.z;
    double ra_deg = std::atan2(y, x) / kRadiansPerDegree;
    if (ra_deg < 0.0) {
        ra_deg += 360.0;
    }
    return {ra_deg, std::atan2(z, std::hypot(x, y)) / kRadiansPerDegree};
}

MergedCatalog mergeCatalogRows(std::vector<CatalogRow> rows, const CatalogMergeSettings& settings,
                               unsigned threads) {
    MergedCatalog result;
    MergeReport& report = result.report;
    report.rows_in = static_cast<std::int64_t>(rows.size());
    // Argument order: "earlier" below means a lower (file_index, row_index). Objects are merged in place:
    // each object's first row absorbs the others.
    const auto in_argument_order = [](const CatalogRow& a, const CatalogRow& b) {
        return std::tie(a.file_index, a.row_index) < std::tie(b.file_index, b.row_index);
    };
    if (!std::is_sorted(rows.begin(), rows.end(), in_argument_order)) { // a scan's candidates already are
        std::sort(rows.begin(), rows.end(), in_argument_order);
    }
    std::vector<double> epoch_yr(rows.size()); // of each row's position, then of its object's
    for (std::size_t i = 0; i < rows.size(); ++i) {
        epoch_yr[i] = fileEpoch(settings, rows[i].file_index);
    }
    std::vector<bool> absorbed(rows.size(), false);
    std::map<std::pair<std::uint32_t, std::uint32_t>, FilePairMerges> pair_counts;
    const auto absorbInto = [&](std::uint32_t kept, std::uint32_t other, MergeKind kind,
                                double separation_arcsec) {
        absorb(rows[kept], epoch_yr[kept], rows[other], epoch_yr[other]);
        absorbed[other] = true;
        ++(kind == MergeKind::SourceId ? report.source_id_merges : report.positional_merges);
        countMerge(pair_counts, rows[kept].file_index, rows[other].file_index, kind);
        report.links.push_back({rows[kept].file_index, rows[kept].row_index, rows[other].file_index,
                                rows[other].row_index, kind, separation_arcsec});
    };

    // 1. The same source_id: one object, folded in argument order into its first row.
    // (source_id, row) pairs sorted as pairs: the rows of one source_id in argument order, as a stable sort
    // by source_id alone gives, without reaching into the rows (256 bytes each) for every comparison.
    std::vector<std::pair<std::int64_t, std::uint32_t>> by_source_id;
    for (std::uint32_t i = 0; i < rows.size(); ++i) {
        if (rows[i].source_id != photometry::kMissingSourceId) {
            by_source_id.emplace_back(rows[i].source_id, i);
        }
    }
    std::sort(by_source_id.begin(), by_source_id.end());
    std::vector<std::uint32_t> object_of(rows.size()); // index into object_rows
    std::vector<std::uint32_t> object_rows;            // each object's first row
    FileSets files;
    std::vector<std::uint32_t> first_of(rows.size());
    std::iota(first_of.begin(), first_of.end(), 0u);
    for (std::size_t k = 1; k < by_source_id.size(); ++k) {
        const auto [source_id, row] = by_source_id[k];
        if (source_id == by_source_id[k - 1].first) {
            first_of[row] = first_of[by_source_id[k - 1].second];
        }
    }
    by_source_id = {};
    for (std::uint32_t i = 0; i < rows.size(); ++i) {
        const std::uint32_t file = rows[i].file_index;
        if (first_of[i] == i) {
            object_of[i] = static_cast<std::uint32_t>(object_rows.size());
            object_rows.push_back(i);
            files.addObject(file);
            continue;
        }
        object_of[i] = object_of[first_of[i]];
        files.add(object_of[i], file);
        absorbInto(first_of[i], i, MergeKind::SourceId, 0.0);
    }
    first_of = {};
    object_of = {};

    // 2. Positional match across files at the common epoch. Rows are in file order: one file (the usual
    // single query) has no pairs to look for.
    const bool several_files = !rows.empty() && rows.front().file_index != rows.back().file_index;
    if (settings.match_radius_arcsec > 0.0 && object_rows.size() > 1 && several_files) {
        std::vector<UnitVector> positions(object_rows.size());
        for (std::size_t i = 0; i < object_rows.size(); ++i) {
            const std::uint32_t row = object_rows[i];
            positions[i] = unitVector(positionAtEpoch(rows[row], epoch_yr[row], settings.match_epoch_yr));
        }
        const auto pairs = positionalPairs(rows, object_rows, files, positions, settings, threads,
                                           report.pairs_refused_by_parallax);
        const std::vector<std::uint32_t> root = groupByPosition(pairs, object_rows.size(), std::move(files));
        // Objects are in argument order, so each group's root comes before its other objects.
        for (std::uint32_t i = 0; i < object_rows.size(); ++i) {
            if (root[i] != i) {
                absorbInto(object_rows[root[i]], object_rows[i], MergeKind::Position,
                           separationRadians(positions[root[i]], positions[i]) * kArcsecPerRadian);
            }
        }
    }
    std::size_t kept = 0;
    for (std::size_t i = 0; i < rows.size(); ++i) {
        if (!absorbed[i]) {
            if (kept != i) { // nothing moves before the first absorbed row (a single file: none)
                rows[kept] = std::move(rows[i]);
            }
            ++kept;
        }
    }
    rows.resize(kept);
    result.rows = std::move(rows);
    report.rows_out = static_cast<std::int64_t>(result.rows.size());
    for (const auto& [key, counts] : pair_counts) {
        report.file_pairs.push_back(counts);
    }
    std::sort(report.links.begin(), report.links.end(), [](const MergeLink& a, const MergeLink& b) {
        return std::tie(a.kept_file, a.kept_row, a.absorbed_file, a.absorbed_row) <
               std::tie(b.kept_file, b.kept_row, b.absorbed_file, b.absorbed_row);
    });
    return result;
}

} // namespace starcensus::census
