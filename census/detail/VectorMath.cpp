#include "census/detail/VectorMath.h"

#include <cmath>

// Built with -ffast-math (census/CMakeLists.txt), which is what makes glibc's <math.h> declare the vector
// variants for GCC to call; nothing else is in this file for it to change. Two clones, chosen at load
// time by the CPU: AVX2 (4 doubles per call) and the x86-64 baseline (SSE2, 2 per call).

namespace starcensus::census::detail {

__attribute__((target_clones("avx2", "default"))) void expInPlace(std::span<double> values) {
    for (double& value : values) {
        value = std::exp(value);
    }
}

__attribute__((target_clones("avx2", "default"))) void log10InPlace(std::span<double> values) {
    for (double& value : values) {
        value = std::log10(value);
    }
}

} // namespace starcensus::census::detail
