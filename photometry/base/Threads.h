#pragma once
// The project's one thread loop, and the meaning of a thread-count setting shared by every
// multi-threaded step (scan, Monte Carlo, host re-measurements, completeness correction): 0 asks for one
// thread per hardware thread.
#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>
#include <type_traits>
#include <vector>

namespace starcensus {

inline unsigned resolveThreadCount(unsigned requested) {
    return requested != 0 ? requested : std::max(1u, std::thread::hardware_concurrency());
}

/// Calls body(i, worker) (or body(i)) for every i in [0, count) on min(resolveThreadCount(threads),
/// count) threads, the calling thread among them; worker is the thread's index, below
/// resolveThreadCount(threads). Items are claimed in increasing order from a shared counter, so uneven
/// items balance themselves. For items that each write their own slot (and draw from their own random
/// stream), or add into per-worker partial sums that are combined exactly afterwards: the result does
/// not depend on the thread count or on which thread took which item. Returns when every item is done;
/// if any threw, the exception of the lowest such index is rethrown then.
template <class Body>
void forEachIndex(std::size_t count, unsigned threads, Body&& body) {
    const auto workers = static_cast<unsigned>(
        std::min<std::size_t>(resolveThreadCount(threads), std::max<std::size_t>(count, 1)));
    std::atomic<std::size_t> next{0};
    std::mutex error_mutex;
    std::size_t error_index = std::numeric_limits<std::size_t>::max();
    std::exception_ptr error;
    const auto run = [&](unsigned worker) {
        for (std::size_t i = next++; i < count; i = next++) {
            try {
                if constexpr (std::is_invocable_v<Body&, std::size_t, unsigned>) {
                    body(i, worker);
                } else {
                    body(i);
                }
            } catch (...) {
                const std::lock_guard lock(error_mutex);
                if (i < error_index) {
                    error_index = i;
                    error = std::current_exception();
                }
            }
        }
    };
    {
        std::vector<std::jthread> pool;
        for (unsigned worker = 1; worker < workers; ++worker) {
            pool.emplace_back(run, worker);
        }
        run(0);
    }
    if (error) {
        std::rethrow_exception(error);
    }
}

} // namespace starcensus
