// Writes a benchmark input catalog: a mock solar neighbourhood out to RADIUS pc, in the Gaia-archive
// layout of census/mock/Output.h (100 bytes per row), streamed in bounded memory. Out to 367 pc it holds
// about 10 million rows (158 pc: 1 million), of which only ~0.05% can lie within 25 pc: like an all-sky
// catalog, almost every row is read only to be rejected by the candidate test.
// Not a test. Usage: make_bench_catalog OUTPUT.fits RADIUS_PC [SEED]
#include "census/mock/Output.h"

#include <cstdio>
#include <cstdlib>
#include <exception>

int main(int argc, char** argv) {
    if (argc < 3) {
        std::fprintf(stderr, "usage: make_bench_catalog OUTPUT.fits RADIUS_PC [SEED]\n");
        return 2;
    }
    try {
        starcensus::census::mock::MockSettings settings;
        settings.radius_max_pc = std::strtod(argv[2], nullptr);
        const std::uint64_t seed = argc > 3 ? std::strtoull(argv[3], nullptr, 10) : 1;
        const double radii_pc[] = {10.0, 25.0};
        const auto summary = starcensus::census::mock::streamMockCatalog(argv[1], settings, seed, radii_pc);
        std::printf("%s: %lld rows (mock to %.0f pc, seed %llu)\n", argv[1],
                    static_cast<long long>(summary.catalogued), settings.radius_max_pc,
                    static_cast<unsigned long long>(seed));
    } catch (const std::exception& error) {
        std::fprintf(stderr, "make_bench_catalog: %s\n", error.what());
        return 1;
    }
    return 0;
}
