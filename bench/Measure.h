#pragma once
// What the benchmark programs measure besides wall time: CPU seconds of the whole process and its peak
// resident memory.
#include <sys/resource.h>
#include <time.h>

namespace starcensus::bench {

/// CPU seconds of the whole process (all threads): less sensitive than wall time to other load.
inline double processCpuSeconds() {
    timespec now{};
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &now);
    return static_cast<double>(now.tv_sec) + 1e-9 * static_cast<double>(now.tv_nsec);
}

/// Peak resident set size of the process so far (MiB).
inline double peakResidentMiB() {
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return static_cast<double>(usage.ru_maxrss) / 1024.0;
}

} // namespace starcensus::bench
