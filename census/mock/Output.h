#pragma once
// Files of a mock: the catalog as a FITS binary table with the column names, units and UCDs of the Gaia
// DR3 archive (gaia_source) and of the 2MASS point-source catalogue, so it reads like a real catalog;
// and the truth as JSON. Both are written atomically (starcensus::AtomicOutput).
#include "census/mock/Neighbourhood.h"
#include "photometry/catalog/FitsTableWriter.h"

#include <nlohmann/json.hpp>

#include <filesystem>
#include <memory>
#include <span>

namespace starcensus::census::mock {

/// The catalog's columns: source_id (K), ra, dec (deg), parallax, parallax_error (mas), pmra, pmdec
/// (mas/yr), phot_g/bp/rp_mean_mag (mag), phot_g/bp/rp_mean_flux_over_error, j_m, h_m, ks_m (mag),
/// ruwe. Missing values are NaN.
std::vector<photometry::FitsColumn> mockCatalogColumns();

/// Writes catalog rows in blocks as they are simulated; the file appears on finish().
class MockCatalogWriter {
  public:
    MockCatalogWriter(const std::filesystem::path& path, const MockSettings& settings, std::uint64_t seed);
    void append(std::span<const photometry::CatalogRow> rows);
    void finish();
    std::int64_t rowCount() const { return writer_.rowCount(); }

  private:
    photometry::FitsTableWriter writer_;
    photometry::FitsRowBlock block_;
};

/// The whole catalog of a simulated mock.
void writeMockCatalog(const std::filesystem::path& path, const MockResult& result);

/// The companion catalogue's columns, named as literature compilations and VizieR tables name them, with
/// units and UCDs, so starcensus maps them without --column: ra, dec (deg, at the POSEPOCH keyword's
/// epoch), parallax, parallax_error (mas), pmra, pmdec (mas/yr), bmag, e_bmag, vmag, e_vmag (Johnson),
/// j_m, h_m, ks_m and their *_msigcom errors, w1mpro, w1sigmpro, w2mpro, w2sigmpro (WISE), spectral_type.
/// No source_id: the objects are matched to the Gaia-like catalogue by position.
std::vector<photometry::FitsColumn> companionCatalogColumns();
/// Writes result.companion_catalog (MockSettings::companion must be enabled).
void writeCompanionCatalog(const std::filesystem::path& path, const MockResult& result);

/// Truth document: settings, seed, totals, counts per class within each radius (pc) and, per object,
/// source_id, class, stage, spectral code and type, distance, masses, age, binarity, magnitudes and
/// whether it is catalogued. With a companion catalogue, also per object the files that hold it ("files":
/// "gaia", "companion") and its companion row, and per radius the counts in the companion, in both files
/// and in either. NaN values are written as null.
nlohmann::json mockTruthJson(const MockResult& result, std::span<const double> radii_pc);
void writeMockTruth(const std::filesystem::path& path, const MockResult& result,
                    std::span<const double> radii_pc);

/// The settings as JSON (field names of MockSettings; units in the names).
nlohmann::json mockSettingsJson(const MockSettings& settings);

struct MockStreamSummary {
    std::int64_t objects = 0;
    std::int64_t catalogued = 0;
    std::int64_t remnant_only_systems = 0;
    std::vector<RadiusCounts> counts;
};

/// Simulates and writes the catalog chunk by chunk (`chunk_systems` systems at a time), so catalogs of
/// any size (the 10-million-row benchmark) are written in bounded memory; per-object truth is not kept,
/// only the counts within `radii_pc`. Same objects as simulateNeighbourhood() with the same seed.
MockStreamSummary streamMockCatalog(const std::filesystem::path& path, const MockSettings& settings,
                                    std::uint64_t seed, std::span<const double> radii_pc,
                                    std::size_t chunk_systems = 100000);

} // namespace starcensus::census::mock
