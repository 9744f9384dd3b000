// Benchmark of the catalog scan: reads, maps and selects the candidates of a 25 pc census (by default)
// from the given files, and prints rows per second, wall time and the peak resident memory of the process.
// Not a test: figures depend on the machine and on the page cache.
// Usage: scan_bench [--radius PC] [--threads N] [--block-kib KIB] FILE...
#include "bench/Measure.h"
#include "photometry/catalog/CatalogScan.h"

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <string>
#include <vector>

int main(int argc, char** argv) {
    double radius_pc = 25.0;
    starcensus::photometry::ScanSettings settings;
    std::vector<std::string> paths;
    for (int i = 1; i < argc; ++i) {
        if (std::strcmp(argv[i], "--radius") == 0 && i + 1 < argc) {
            radius_pc = std::strtod(argv[++i], nullptr);
        } else if (std::strcmp(argv[i], "--block-kib") == 0 && i + 1 < argc) {
            settings.block_bytes = std::strtoull(argv[++i], nullptr, 10) << 10;
        } else if (std::strcmp(argv[i], "--threads") == 0 && i + 1 < argc) {
            settings.threads = static_cast<unsigned>(std::strtoul(argv[++i], nullptr, 10));
        } else {
            paths.emplace_back(argv[i]);
        }
    }
    if (paths.empty()) {
        std::fprintf(stderr, "usage: scan_bench [--radius PC] [--threads N] [--block-kib KIB] FILE...\n");
        return 2;
    }
    settings.min_parallax_mas = 1000.0 / radius_pc;
    try {
        const auto start = std::chrono::steady_clock::now();
        const auto scan = starcensus::photometry::scanCatalogs(paths, settings);
        const double seconds =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
        std::printf("scan: files %zu, rows %lld, candidates %lld, %.3f s, %.1f M rows/s, peak RSS %.0f MiB\n",
                    paths.size(), static_cast<long long>(scan.totals.rows_read),
                    static_cast<long long>(scan.totals.candidates), seconds,
                    static_cast<double>(scan.totals.rows_read) / seconds / 1e6,
                    starcensus::bench::peakResidentMiB());
    } catch (const std::exception& error) {
        std::fprintf(stderr, "scan_bench: %s\n", error.what());
        return 1;
    }
    return 0;
}
