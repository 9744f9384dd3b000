#pragma once
// A small, fast and reproducible random-number engine: xoshiro256++ (Blackman & Vigna 2021, "Scrambled
// linear pseudorandom number generators", ACM TOMS 47, 36), seeded through splitmix64 as its authors
// recommend. Independent streams (one per thread, per mock, per draw block) come from seeding with
// (seed, stream) so results never depend on how work is split across threads.
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numbers>

namespace starcensus::census {

class Xoshiro256 {
  public:
    using result_type = std::uint64_t;

    Xoshiro256(std::uint64_t seed, std::uint64_t stream = 0) {
        std::uint64_t mix = seed ^ (0x9E3779B97F4A7C15ULL * (stream + 1));
        for (auto& word : state_) {
            word = splitmix64(mix);
        }
    }

    static constexpr result_type min() { return 0; }
    static constexpr result_type max() { return std::numeric_limits<result_type>::max(); }

    result_type operator()() {
        const std::uint64_t result = rotl(state_[0] + state_[3], 23) + state_[0];
        const std::uint64_t t = state_[1] << 17;
        state_[2] ^= state_[0];
        state_[3] ^= state_[1];
        state_[1] ^= state_[2];
        state_[0] ^= state_[3];
        state_[2] ^= t;
        state_[3] = rotl(state_[3], 45);
        return result;
    }

    /// Uniform in [0, 1) with 53 random bits.
    double uniform() { return static_cast<double>((*this)() >> 11) * 0x1.0p-53; }

    /// Uniform in (0, 1): safe to take a logarithm of.
    double uniformOpen() { return (static_cast<double>((*this)() >> 11) + 0.5) * 0x1.0p-53; }

    /// Standard normal deviate (Marsaglia polar method; exact, used outside the hottest loops).
    double normal() {
        if (has_spare_) {
            has_spare_ = false;
            return spare_;
        }
        double u = 0.0;
        double v = 0.0;
        double s = 0.0;
        do {
            u = 2.0 * uniform() - 1.0;
            v = 2.0 * uniform() - 1.0;
            s = u * u + v * v;
        } while (s >= 1.0 || s == 0.0);
        const double factor = std::sqrt(-2.0 * std::log(s) / s);
        spare_ = v * factor;
        has_spare_ = true;
        return u * factor;
    }

    /// Gamma(shape, 1) deviate, shape >= 0 (0 gives 0): Marsaglia & Tsang 2000 ("A simple method for
    /// generating gamma variables", ACM TOMS 26, 363), squeeze and log test of their section 4; below
    /// shape 1 their boost Gamma(shape + 1) * U^(1/shape) (section 6).
    double gamma(double shape) {
        if (!(shape > 0.0)) {
            return 0.0;
        }
        if (shape < 1.0) {
            return gamma(shape + 1.0) * std::exp(std::log(uniformOpen()) / shape);
        }
        const double d = shape - 1.0 / 3.0;
        const double c = 1.0 / std::sqrt(9.0 * d);
        while (true) {
            double x = 0.0;
            double v = 0.0;
            do {
                x = normal();
                v = 1.0 + c * x;
            } while (v <= 0.0);
            v = v * v * v;
            const double u = uniformOpen();
            const double x2 = x * x;
            if (u < 1.0 - 0.0331 * x2 * x2 || std::log(u) < 0.5 * x2 + d * (1.0 - v + std::log(v))) {
                return d * v;
            }
        }
    }

  private:
    static std::uint64_t rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }
    static std::uint64_t splitmix64(std::uint64_t& x) {
        std::uint64_t z = (x += 0x9E3779B97F4A7C15ULL);
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
        return z ^ (z >> 31);
    }

    std::array<std::uint64_t, 4> state_{};
    double spare_ = 0.0;
    bool has_spare_ = false;
};

} // namespace starcensus::census
