// The system finder (census/Systems.h) on a mock catalogue of about N candidates (default 10^5) with
// resolved companions: the mock is simulated to the radius that holds N systems at the mock density,
// then findSystems() runs once, with masses from the classifier. Prints wall and CPU time of the grouping
// alone (the real search and the shifted skies), pairs and systems found, and peak RSS.
//
// Usage: systems_bench [CANDIDATES [THREADS]]
#include "bench/Measure.h"
#include "census/SystemFractions.h"
#include "census/mock/Neighbourhood.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <numbers>

int main(int argc, char** argv) {
    using namespace starcensus;
    const double candidates = argc > 1 ? std::atof(argv[1]) : 1e5;
    const unsigned threads = argc > 2 ? static_cast<unsigned>(std::atoi(argv[2])) : 1;
    census::mock::MockSettings settings;
    settings.wide_companion_fraction = 0.15;
    settings.g_limit_mag = 25.0; // nearly every object catalogued, so the count is about the target
    settings.radius_max_pc =
        std::cbrt(3.0 * candidates / (4.0 * std::numbers::pi * settings.system_density_per_pc3));
    const census::mock::MockResult mock = census::mock::simulateNeighbourhood(settings, 11);
    std::vector<std::uint8_t> above_binary_band;
    const std::vector<double> masses = census::primaryRankingMasses(
        mock.catalog, photometry::Classifier::shipped(), census::RowClassRules{}, &above_binary_band);
    census::SystemSettings system_settings;
    system_settings.threads = threads;
    const double cpu_start = bench::processCpuSeconds();
    const auto wall_start = std::chrono::steady_clock::now();
    const census::SystemCatalog found =
        census::findSystems(mock.catalog, masses, above_binary_band, system_settings);
    const double wall_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
    const double cpu_s = bench::processCpuSeconds() - cpu_start;
    std::size_t multiples = 0;
    for (const auto& system : found.systems) {
        multiples += system.members.size() > 1 ? 1 : 0;
    }
    std::printf(
        "systems: %zu candidates (mock to %.1f pc), %u thread(s): %.3f s wall, %.3f s CPU; %zu candidate "
        "pairs, %.1f per shifted sky, %zu multiple systems; peak RSS %.0f MiB\n",
        mock.catalog.size(), settings.radius_max_pc, threads, wall_s, cpu_s, found.pairs.size(),
        found.shifted_pairs_per_sky, multiples, bench::peakResidentMiB());
    return 0;
}
