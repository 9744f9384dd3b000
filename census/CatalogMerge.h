#pragma once
// One object per star when catalogues overlap: rows with the same source_id are one object, and rows of
// different files that coincide on the sky at a common epoch (positions propagated with their proper
// motions) with consistent parallaxes are one object. The merged row takes each measured quantity from
// the row that measured it best. Pure computation on the candidate rows of a scan; the counts go to
// provenance.json, the report and the run summary.
#include "photometry/catalog/CatalogRow.h"

#include <cstdint>
#include <vector>

namespace starcensus::census {

/// Gaia DR3's reference epoch (Julian year): positions of a Gaia DR3 query are at J2016.0 (Lindegren
/// et al. 2021, A&A 649, A2; from memory).
inline constexpr double kGaiaDr3EpochYr = 2016.0;

struct CatalogMergeSettings {
    // Largest separation at the common epoch for a positional match (arcsec); 0 turns positional
    // matching off (source_id merges still happen).
    double match_radius_arcsec = 2.0;
    // Parallaxes of a positional match must agree within this many combined standard errors,
    // |plx_a - plx_b| <= k sqrt(err_a^2 + err_b^2) (dimensionless).
    double parallax_consistency_sigma = 3.0;
    double match_epoch_yr = kGaiaDr3EpochYr; // the common epoch of the positional match (Julian year)
    // Epoch of each input file's positions (Julian year), by file_index; files beyond the end, or NaN,
    // are at default_epoch_yr.
    std::vector<double> file_epochs_yr;
    double default_epoch_yr = kGaiaDr3EpochYr;
};

enum class MergeKind : std::uint8_t { SourceId, Position };

/// Merged rows of one pair of input files: file_a <= file_b (equal for duplicates inside one file).
struct FilePairMerges {
    std::uint32_t file_a = 0;
    std::uint32_t file_b = 0;
    std::int64_t by_source_id = 0; // rows absorbed because they repeat a source_id
    std::int64_t by_position = 0;  // objects absorbed by the positional match
};

/// One absorption: the absorbed row (its object, for a positional match) joined the object whose first
/// row is `kept`.
struct MergeLink {
    std::uint32_t kept_file = 0;
    std::int64_t kept_row = 0;
    std::uint32_t absorbed_file = 0;
    std::int64_t absorbed_row = 0;
    MergeKind kind = MergeKind::SourceId;
    double separation_arcsec = 0.0; // at the common epoch
};

struct MergeReport {
    std::int64_t rows_in = 0;
    std::int64_t rows_out = 0;
    std::int64_t source_id_merges = 0;
    std::int64_t positional_merges = 0;
    // Pairs of rows from different files within the radius that the parallax test kept apart.
    std::int64_t pairs_refused_by_parallax = 0;
    std::vector<FilePairMerges> file_pairs; // only pairs with a merge, ordered by (file_a, file_b)
    std::vector<MergeLink> links;           // ordered by kept row, then absorbed row
};

struct MergedCatalog {
    std::vector<photometry::CatalogRow> rows; // ordered by (file_index, row_index) of each object's first row
    MergeReport report;
};

/// Merges the rows (any order) into one row per object. Rules, in argument (file_index) order:
/// - the same non-missing source_id: one object, within a file or across files;
/// - positional: objects from different files within match_radius_arcsec at match_epoch_yr, with
///   consistent parallaxes (rows without a parallax or its error skip this test), joined nearest pair
///   first (rows without ra or dec take no part); an object never takes two rows of one file, so the resolved
///   components of a binary stay two objects;
/// - each quantity with an error (parallax; each band) comes, with its error, from the row with the
///   smaller error (a value with an error beats one without; ties and values without errors: the earlier
///   row); ra, dec, pmra, pmdec and ruwe belong to one astrometric solution and travel with the
///   parallax; the literature spectral type is the earliest parsed one (else the earliest refused);
///   source_id and the literature component count are the earliest non-missing ones; file_index and row_index
///   are the object's first row's.
/// `threads`: as forEachIndex (the neighbour search); the result does not depend on it.
MergedCatalog mergeCatalogRows(std::vector<photometry::CatalogRow> rows, const CatalogMergeSettings& settings,
                               unsigned threads = 0);

struct SkyPosition {
    double ra_deg = 0.0;
    double dec_deg = 0.0;
};

/// The row's position moved from from_epoch_yr to to_epoch_yr (Julian years) along a straight line in
/// space with zero radial velocity (pmra includes cos dec; mas/yr); unchanged without a proper motion.
SkyPosition positionAtEpoch(const photometry::CatalogRow& row, double from_epoch_yr, double to_epoch_yr);

} // namespace starcensus::census
