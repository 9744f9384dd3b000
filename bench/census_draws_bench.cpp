// Benchmark of the Monte Carlo over measurement errors: a 300,000-candidate sample, 1000 draws.
// Prints star-draws per second per core and in total, wall time and peak resident memory.
// Not a test: figures depend on the machine. Usage: census_draws_bench [candidates] [draws] [threads]
#include "bench/Measure.h"
#include "census/MonteCarlo.h"
#include "census/Random.h"
#include "photometry/ClassGrid.h"
#include "photometry/Classifier.h"
#include "photometry/DwarfLocus.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <thread>

using namespace starcensus;
using starcensus::bench::peakResidentMiB;
using starcensus::bench::processCpuSeconds;

namespace {

// Candidates spread uniformly in a 100 pc sphere on the dwarf locus (codes F0-M9), with Gaia-like
// errors: parallax 0.02-0.5 mas, G 1 mmag, BP/RP 3 mmag.
std::vector<photometry::CatalogRow> benchSample(std::size_t n) {
    const auto& locus = photometry::DwarfLocus::shipped();
    census::Xoshiro256 random(42);
    std::vector<photometry::CatalogRow> rows(n);
    for (auto& row : rows) {
        const double distance_pc = 100.0 * std::cbrt(random.uniform());
        const auto point = locus.atCode(30.0 + 39.0 * random.uniform());
        const double modulus = 5.0 * std::log10(distance_pc / 10.0);
        row.parallax_error_mas = 0.02 + 0.48 * random.uniform();
        row.parallax_mas = 1000.0 / distance_pc + row.parallax_error_mas * random.normal();
        row.g_mag = point.abs_g_mag + modulus;
        row.g_error_mag = 0.001;
        row.rp_mag = row.g_mag - point.g_rp_mag;
        row.bp_mag = row.rp_mag + point.bp_rp_mag;
        row.bp_error_mag = 0.003;
        row.rp_error_mag = 0.003;
    }
    return rows;
}

} // namespace

int main(int argc, char** argv) {
    const std::size_t candidates = argc > 1 ? std::strtoull(argv[1], nullptr, 10) : 300000;
    const int draws = argc > 2 ? std::atoi(argv[2]) : 1000;
    const unsigned threads =
        argc > 3 ? static_cast<unsigned>(std::atoi(argv[3])) : std::thread::hardware_concurrency();
    const auto rows = benchSample(candidates);
    const auto grid = photometry::ClassGrid::fromClassifier(photometry::Classifier::shipped());

    const double cpu_start = processCpuSeconds();
    const auto start = std::chrono::steady_clock::now();
    const census::PreparedSample sample(rows, {10.0, 25.0, 50.0, 100.0}, census::MembershipSettings{},
                                        census::RowClassRules{}, threads);
    const auto prepared = std::chrono::steady_clock::now();
    const double cpu_prepared = processCpuSeconds();
    const auto tallies = census::drawSample(sample, grid, {.draws = draws, .seed = 1, .threads = threads});
    const auto done = std::chrono::steady_clock::now();
    const double cpu_done = processCpuSeconds();

    const double prepare_s = std::chrono::duration<double>(prepared - start).count();
    const double draw_s = std::chrono::duration<double>(done - prepared).count();
    const double star_draws = static_cast<double>(candidates) * draws;
    std::printf("draws: candidates %zu, draws %d, threads %u, radii 4\n", candidates, draws, threads);
    std::printf("draws: prepare (posteriors) %.2f s wall, %.2f s CPU\n", prepare_s, cpu_prepared - cpu_start);
    std::printf("draws: Monte Carlo wall time %.2f s, CPU %.2f s, %.1f draws/s\n", draw_s,
                cpu_done - cpu_prepared, draws / draw_s);
    std::printf("draws: %.1f M star-draws per CPU-second\n", star_draws / (cpu_done - cpu_prepared) / 1e6);
    std::printf("draws: %.1f M star-draws/s in total, %.1f M star-draws/s per core\n",
                star_draws / draw_s / 1e6, star_draws / draw_s / 1e6 / threads);
    std::printf("draws: peak RSS %.0f MiB\n", peakResidentMiB());
    std::printf("draws: checksum %u\n", tallies.count(0, 3, 65));
    return 0;
}
