#pragma once
// The meaning of a thread-count setting, shared by every multi-threaded step (scan, Monte Carlo, host
// list): 0 asks for one thread per hardware thread.
#include <algorithm>
#include <thread>

namespace starcensus {

inline unsigned resolveThreadCount(unsigned requested) {
    return requested != 0 ? requested : std::max(1u, std::thread::hardware_concurrency());
}

} // namespace starcensus
