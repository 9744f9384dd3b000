// Benchmark of the catalogue merge (census/CatalogMerge.h): two overlapping candidate lists as from a
// Gaia query and a J2000.0 catalogue without source_id, a third of the objects in both. Prints the
// merge counts, wall and CPU time and the peak resident memory before and after the merge.
// Not a test: figures depend on the machine. Usage: catalog_merge_bench [rows] [threads]
#include "bench/Measure.h"
#include "census/CatalogMerge.h"
#include "census/Random.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <numbers>
#include <thread>

using namespace starcensus;

namespace {

// `rows` candidate rows of 0.75 rows objects uniform on the sky (isotropic), at 5-100 pc with
// transverse speeds of ~30 km/s: file 0 holds the first two thirds of the objects at J2016.0 with
// source_id, file 1 the last two thirds at J2000.0 (positions moved back) without, each row with
// 20 mas of position noise and its own parallax error.
std::vector<photometry::CatalogRow> benchRows(std::size_t rows) {
    census::Xoshiro256 random(7);
    const std::size_t objects = rows * 3 / 4;
    std::vector<photometry::CatalogRow> catalogue;
    catalogue.reserve(2 * (objects - objects / 3));
    std::vector<std::int64_t> next_row(2, 0);
    for (std::size_t i = 0; i < objects; ++i) {
        photometry::CatalogRow row;
        row.source_id = static_cast<std::int64_t>(i) + 1;
        row.ra_deg = 360.0 * random.uniform();
        row.dec_deg = std::asin(2.0 * random.uniform() - 1.0) * 180.0 / std::numbers::pi;
        const double distance_pc = 5.0 + 95.0 * random.uniform();
        const double mas_per_yr_per_km_s = 1000.0 / (4.74047 * distance_pc);
        row.pmra_mas_per_yr = 30.0 * random.normal() * mas_per_yr_per_km_s;
        row.pmdec_mas_per_yr = 30.0 * random.normal() * mas_per_yr_per_km_s;
        row.g_mag = 8.0 + 10.0 * random.uniform();
        row.g_error_mag = 0.001;
        for (std::uint32_t file = 0; file < 2; ++file) {
            const bool in_file = file == 0 ? i < objects * 2 / 3 : i >= objects / 3;
            if (!in_file) {
                continue;
            }
            photometry::CatalogRow copy = row;
            copy.file_index = file;
            copy.row_index = next_row[file]++;
            copy.parallax_error_mas = file == 0 ? 0.05 : 1.0;
            copy.parallax_mas = 1000.0 / distance_pc + copy.parallax_error_mas * random.normal();
            if (file == 1) {
                copy.source_id = photometry::kMissingSourceId;
                const auto moved = census::positionAtEpoch(copy, 2016.0, 2000.0);
                copy.ra_deg = moved.ra_deg;
                copy.dec_deg = moved.dec_deg;
            }
            copy.ra_deg += 20.0 / 3.6e6 * random.normal() / std::cos(copy.dec_deg * std::numbers::pi / 180.0);
            copy.dec_deg += 20.0 / 3.6e6 * random.normal();
            catalogue.push_back(copy);
        }
    }
    return catalogue;
}

} // namespace

int main(int argc, char** argv) {
    const std::size_t rows = argc > 1 ? std::strtoull(argv[1], nullptr, 10) : 1000000;
    const unsigned threads =
        argc > 2 ? static_cast<unsigned>(std::atoi(argv[2])) : std::thread::hardware_concurrency();
    std::vector<photometry::CatalogRow> input = benchRows(rows);
    const std::size_t input_rows = input.size();
    const double rss_before_mib = bench::peakResidentMiB();
    census::CatalogMergeSettings settings;
    settings.file_epochs_yr = {2016.0, 2000.0};

    const double cpu_start = bench::processCpuSeconds();
    const auto start = std::chrono::steady_clock::now();
    const census::MergedCatalog merged = census::mergeCatalogRows(std::move(input), settings, threads);
    const double wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    const double cpu_s = bench::processCpuSeconds() - cpu_start;

    std::printf("merge: rows %zu, threads %u, radius %.1f arcsec\n", input_rows, threads,
                settings.match_radius_arcsec);
    std::printf("merge: objects %lld, by source_id %lld, by position %lld, refused by parallax %lld\n",
                static_cast<long long>(merged.report.rows_out),
                static_cast<long long>(merged.report.source_id_merges),
                static_cast<long long>(merged.report.positional_merges),
                static_cast<long long>(merged.report.pairs_refused_by_parallax));
    std::printf("merge: %.3f s wall, %.3f s CPU, %.2f M rows/s\n", wall_s, cpu_s,
                static_cast<double>(input_rows) / wall_s / 1e6);
    std::printf("merge: peak RSS %.0f MiB before the merge (the input rows), %.0f MiB after\n",
                rss_before_mib, bench::peakResidentMiB());
    return 0;
}
