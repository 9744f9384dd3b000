#pragma once
// The meaning of a thread-count setting, shared by every multi-threaded step (scan, Monte Carlo, host
// list): 0 asks for one thread per hardware thread.
#include <algorithm>
#include <cstddef>
#include <thread>
#include <vector>

namespace starcensus {

inline unsigned resolveThreadCount(unsigned requested) {
    return requested != 0 ? requested : std::max(1u, std::thread::hardware_concurrency());
}

/// Calls body(i) for every i in [0, count) on resolveThreadCount(threads) threads, thread t taking
/// i = t, t + threads, ...; returns when all are done. For independent items that each write their own
/// slot (and draw from their own random stream), so the result does not depend on the thread count.
template <class Body>
void forEachInterleaved(std::size_t count, unsigned threads, Body&& body) {
    const unsigned workers = resolveThreadCount(threads);
    const auto run = [&](unsigned first) {
        for (std::size_t i = first; i < count; i += workers) {
            body(i);
        }
    };
    std::vector<std::jthread> pool;
    for (unsigned t = 1; t < workers; ++t) {
        pool.emplace_back(run, t);
    }
    run(0);
}

} // namespace starcensus
