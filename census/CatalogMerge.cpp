#include "census/CatalogMerge.h"

#include "photometry/base/Threads.h"

#include <healpix_cxx/healpix_base.h>
#include <healpix_cxx/pointing.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <numbers>
#include <numeric>
#include <unordered_map>

namespace starcensus::census {

namespace {

using photometry::CatalogRow;

constexpr double kRadiansPerDegree = std::numbers::pi / 180.0;
constexpr double kRadiansPerMas = kRadiansPerDegree / 3.6e6;
constexpr double kArcsecPerRadian = 180.0 / std::numbers::pi * 3600.0;

struct UnitVector {
    double x = 0.0, y = 0.0, z = 0.0;
};

UnitVector unitVector(SkyPosition position) {
    const double ra = position.ra_deg * kRadiansPerDegree;
    const double dec = position.dec_deg * kRadiansPerDegree;
    return {std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra), std::sin(dec)};
}

/// Angle between two unit vectors (radians), from the chord: accurate at arcsecond separations, where
/// acos of the dot product loses half its digits.
double separationRadians(const UnitVector& a, const UnitVector& b) {
    const double chord =
        std::sqrt((a.x - b.x) * (a.x - b.x) + (a.y - b.y) * (a.y - b.y) + (a.z - b.z) * (a.z - b.z));
    return 2.0 * std::asin(std::min(1.0, chord / 2.0));
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
    double CatalogRow::*value;
    double CatalogRow::*error;
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

/// An object being merged: its row so far and the epoch of that row's position (Julian year).
struct MergedObject {
    CatalogRow row;
    double epoch_yr = kGaiaDr3EpochYr;
};

/// Folds a later row into an object by the rules of mergeCatalogRows().
void absorb(MergedObject& object, const CatalogRow& other, double other_epoch_yr) {
    CatalogRow& kept = object.row;
    if (measuresBetter(other.parallax_mas, other.parallax_error_mas, kept.parallax_mas,
                       kept.parallax_error_mas)) {
        // One astrometric solution: position, proper motion and RUWE go with the parallax.
        kept.ra_deg = other.ra_deg;
        kept.dec_deg = other.dec_deg;
        kept.pmra_mas_per_yr = other.pmra_mas_per_yr;
        kept.pmdec_mas_per_yr = other.pmdec_mas_per_yr;
        kept.ruwe = other.ruwe;
        object.epoch_yr = other_epoch_yr;
    }
    for (const Band& band : kBands) {
        if (measuresBetter(other.*band.value, other.*band.error, kept.*band.value, kept.*band.error)) {
            kept.*band.value = other.*band.value;
            kept.*band.error = other.*band.error;
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
}

bool parallaxesConsistent(const CatalogRow& a, const CatalogRow& b, double sigma) {
    const double combined_error = std::hypot(a.parallax_error_mas, b.parallax_error_mas);
    if (std::isnan(a.parallax_mas) || std::isnan(b.parallax_mas) || !(combined_error > 0.0)) {
        return true; // nothing to compare: matched by position alone
    }
    return std::abs(a.parallax_mas - b.parallax_mas) <= sigma * combined_error;
}

/// Sorted, distinct input files an object's rows came from.
using FileSet = std::vector<std::uint32_t>;

bool disjoint(const FileSet& a, const FileSet& b) {
    auto i = a.begin();
    auto j = b.begin();
    while (i != a.end() && j != b.end()) {
        if (*i == *j) {
            return false;
        }
        *i < *j ? ++i : ++j;
    }
    return true;
}

struct CandidatePair {
    double separation_rad;
    std::uint32_t a; // objects, a < b
    std::uint32_t b;
    auto operator<=>(const CandidatePair&) const = default;
};

/// HEALPix RING order whose pixels are about the match radius across, so a disc query returns a few
/// pixels (Gorski et al. 2005, ApJ 622, 759: pixel size ~ 58.6 deg / nside).
T_Healpix_Base<std::int64_t> neighbourGrid(double radius_rad) {
    int order = T_Healpix_Base<std::int64_t>::order_max;
    while (order > 0 && T_Healpix_Base<std::int64_t>(order, RING).max_pixrad() < radius_rad) {
        --order;
    }
    return T_Healpix_Base<std::int64_t>(order, RING);
}

pointing toPointing(const UnitVector& u) {
    return pointing(vec3(u.x, u.y, u.z));
}

/// Pairs of objects from disjoint files within the radius, nearest first; counts the pairs the parallax
/// test refused.
std::vector<CandidatePair> positionalPairs(const std::vector<MergedObject>& objects,
                                           const std::vector<FileSet>& files,
                                           const std::vector<UnitVector>& positions,
                                           const CatalogMergeSettings& settings, unsigned threads,
                                           std::int64_t& refused_by_parallax) {
    const double radius_rad = settings.match_radius_arcsec / kArcsecPerRadian;
    const auto grid = neighbourGrid(radius_rad);
    // Objects sorted by pixel: a disc query's pixel ranges become ranges of this list.
    std::vector<std::pair<std::int64_t, std::uint32_t>> by_pixel(objects.size());
    for (std::size_t i = 0; i < objects.size(); ++i) {
        by_pixel[i] = {grid.vec2pix(vec3(positions[i].x, positions[i].y, positions[i].z)),
                       static_cast<std::uint32_t>(i)};
    }
    std::sort(by_pixel.begin(), by_pixel.end());
    const unsigned workers = resolveThreadCount(threads);
    std::vector<std::vector<CandidatePair>> found(workers);
    std::vector<std::int64_t> refused(workers, 0);
    forEachIndex(objects.size(), threads, [&](std::size_t i, unsigned worker) {
        rangeset<std::int64_t> pixels;
        grid.query_disc_inclusive(toPointing(positions[i]), radius_rad, pixels);
        for (std::size_t r = 0; r < pixels.nranges(); ++r) {
            auto it = std::lower_bound(by_pixel.begin(), by_pixel.end(),
                                       std::pair<std::int64_t, std::uint32_t>{pixels.ivbegin(r), 0});
            for (; it != by_pixel.end() && it->first < pixels.ivend(r); ++it) {
                const std::uint32_t j = it->second;
                if (j <= i || !disjoint(files[i], files[j])) {
                    continue; // each pair once; never two rows of one file
                }
                const double separation = separationRadians(positions[i], positions[j]);
                if (separation > radius_rad) {
                    continue;
                }
                if (!parallaxesConsistent(objects[i].row, objects[j].row,
                                          settings.parallax_consistency_sigma)) {
                    ++refused[worker];
                    continue;
                }
                found[worker].push_back({separation, static_cast<std::uint32_t>(i), j});
            }
        }
    });
    std::vector<CandidatePair> pairs;
    for (auto& part : found) {
        pairs.insert(pairs.end(), part.begin(), part.end());
    }
    std::sort(pairs.begin(), pairs.end()); // nearest first; ties by index: independent of threads
    refused_by_parallax = std::accumulate(refused.begin(), refused.end(), std::int64_t{0});
    return pairs;
}

std::uint32_t findRoot(std::vector<std::uint32_t>& parent, std::uint32_t i) {
    while (parent[i] != i) {
        parent[i] = parent[parent[i]];
        i = parent[i];
    }
    return i;
}

/// Union of the pairs, nearest first, as long as a group's files stay disjoint: each group's root is its
/// lowest (earliest) object.
std::vector<std::uint32_t> groupByPosition(const std::vector<CandidatePair>& pairs,
                                           std::vector<FileSet> files) {
    std::vector<std::uint32_t> parent(files.size());
    std::iota(parent.begin(), parent.end(), 0u);
    for (const CandidatePair& pair : pairs) {
        const std::uint32_t a = findRoot(parent, pair.a);
        const std::uint32_t b = findRoot(parent, pair.b);
        if (a == b || !disjoint(files[a], files[b])) {
            continue;
        }
        const auto [root, child] = std::minmax(a, b);
        parent[child] = root;
        FileSet joined;
        std::set_union(files[root].begin(), files[root].end(), files[child].begin(), files[child].end(),
                       std::back_inserter(joined));
        files[root] = std::move(joined);
        files[child].clear();
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
    // Tycho Catalogues, vol. 1, sec. 1.5.5, without the radial term). Distance cancels.
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
    // Argument order: "earlier" below means a lower (file_index, row_index).
    std::sort(rows.begin(), rows.end(), [](const CatalogRow& a, const CatalogRow& b) {
        return std::tie(a.file_index, a.row_index) < std::tie(b.file_index, b.row_index);
    });
    std::map<std::pair<std::uint32_t, std::uint32_t>, FilePairMerges> pair_counts;

    // 1. The same source_id: one object, folded in argument order.
    std::vector<std::uint32_t> by_source_id;
    for (std::uint32_t i = 0; i < rows.size(); ++i) {
        if (rows[i].source_id != photometry::kMissingSourceId) {
            by_source_id.push_back(i);
        }
    }
    std::stable_sort(by_source_id.begin(), by_source_id.end(),
                     [&](std::uint32_t a, std::uint32_t b) { return rows[a].source_id < rows[b].source_id; });
    std::vector<std::uint32_t> first_of(rows.size());
    std::iota(first_of.begin(), first_of.end(), 0u);
    for (std::size_t k = 1; k < by_source_id.size(); ++k) {
        const std::uint32_t previous = by_source_id[k - 1];
        if (rows[by_source_id[k]].source_id == rows[previous].source_id) {
            first_of[by_source_id[k]] = first_of[previous];
        }
    }
    std::vector<MergedObject> objects;
    std::vector<FileSet> files;
    std::vector<std::uint32_t> object_of(rows.size());
    for (std::uint32_t i = 0; i < rows.size(); ++i) {
        const CatalogRow& row = rows[i];
        if (first_of[i] == i) {
            object_of[i] = static_cast<std::uint32_t>(objects.size());
            objects.push_back({row, fileEpoch(settings, row.file_index)});
            files.push_back({row.file_index});
            continue;
        }
        const std::uint32_t object = object_of[first_of[i]];
        object_of[i] = object;
        MergedObject& merged = objects[object];
        absorb(merged, row, fileEpoch(settings, row.file_index));
        FileSet& object_files = files[object];
        if (std::find(object_files.begin(), object_files.end(), row.file_index) == object_files.end()) {
            object_files.insert(std::upper_bound(object_files.begin(), object_files.end(), row.file_index),
                                row.file_index);
        }
        ++report.source_id_merges;
        countMerge(pair_counts, merged.row.file_index, row.file_index, MergeKind::SourceId);
        report.links.push_back({merged.row.file_index, merged.row.row_index, row.file_index, row.row_index,
                                MergeKind::SourceId, 0.0});
    }

    // 2. Positional match across files at the common epoch.
    std::vector<UnitVector> positions(objects.size());
    for (std::size_t i = 0; i < objects.size(); ++i) {
        positions[i] =
            unitVector(positionAtEpoch(objects[i].row, objects[i].epoch_yr, settings.match_epoch_yr));
    }
    std::vector<std::uint32_t> root(objects.size());
    std::iota(root.begin(), root.end(), 0u);
    if (settings.match_radius_arcsec > 0.0 && objects.size() > 1) {
        const auto pairs =
            positionalPairs(objects, files, positions, settings, threads, report.pairs_refused_by_parallax);
        root = groupByPosition(pairs, files);
    }
    // Objects are in argument order, so each group's root comes before its other objects.
    for (std::uint32_t i = 0; i < objects.size(); ++i) {
        if (root[i] == i) {
            continue;
        }
        MergedObject& group = objects[root[i]];
        const CatalogRow& absorbed = objects[i].row;
        absorb(group, absorbed, objects[i].epoch_yr);
        ++report.positional_merges;
        countMerge(pair_counts, group.row.file_index, absorbed.file_index, MergeKind::Position);
        report.links.push_back({group.row.file_index, group.row.row_index, absorbed.file_index,
                                absorbed.row_index, MergeKind::Position,
                                separationRadians(positions[root[i]], positions[i]) * kArcsecPerRadian});
    }
    for (std::uint32_t i = 0; i < objects.size(); ++i) {
        if (root[i] == i) {
            result.rows.push_back(std::move(objects[i].row));
        }
    }
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
