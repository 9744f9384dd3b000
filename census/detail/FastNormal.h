#pragma once
// Standard normal deviates from 32 random bits by table lookup: the inverse normal CDF tabulated at
// 4096 equally probable cells, linearly interpolated with the remaining 20 bits. Tails are truncated at
// |z| = 3.7 (probability 2e-4 per draw moved inward); good enough for photometric noise in a Monte Carlo
// over classes, and several times faster than an exact method.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>

namespace starcensus::census::detail {

class FastNormal {
  public:
    static constexpr int kIndexBits = 12;
    static constexpr int kCells = 1 << kIndexBits;

    FastNormal() {
        // Node k sits at probability (k + 0.5) / (kCells + 1) so the outermost nodes stay finite.
        for (int k = 0; k <= kCells; ++k) {
            const double p = (k + 0.5) / (kCells + 1.0);
            table_[static_cast<std::size_t>(k)] = static_cast<float>(inverseNormalCdf(p));
        }
    }

    /// One deviate from the low 32 bits of `bits`.
    float operator()(std::uint32_t bits) const noexcept {
        const std::uint32_t index = bits >> (32 - kIndexBits);
        const float fraction = static_cast<float>(bits & ((1u << (32 - kIndexBits)) - 1)) * 0x1.0p-20f;
        const float low = table_[index];
        return low + fraction * (table_[index + 1] - low);
    }

    /// The largest |deviate| operator() can return (the outermost table nodes).
    float largestMagnitude() const noexcept { return std::max(-table_.front(), table_.back()); }

    // Acklam's rational approximation refined by one Halley step (relative error ~1e-15); used to fill
    // tables, not in hot loops.
    static double inverseNormalCdf(double p) {
        static constexpr double a[] = {-3.969683028665376e+01, 2.209460984245205e+02,  -2.759285104469687e+02,
                                       1.383577518672690e+02,  -3.066479806614716e+01, 2.506628277459239e+00};
        static constexpr double b[] = {-5.447609879822406e+01, 1.615858368580409e+02, -1.556989798598866e+02,
                                       6.680131188771972e+01, -1.328068155288572e+01};
        static constexpr double c[] = {-7.784894002430293e-03, -3.223964580411365e-01, -2.400758277161838e+00,
                                       -2.549732539343734e+00, 4.374664141464968e+00,  2.938163982698783e+00};
        static constexpr double d[] = {7.784695709041462e-03, 3.224671290700398e-01, 2.445134137142996e+00,
                                       3.754408661907416e+00};
        double x = 0.0;
        if (p < 0.02425) {
            const double q = std::sqrt(-2.0 * std::log(p));
            x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
                ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1.0);
        } else if (p > 1.0 - 0.02425) {
            const double q = std::sqrt(-2.0 * std::log(1.0 - p));
            x = -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
                ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1.0);
        } else {
            const double q = p - 0.5;
            const double r = q * q;
            x = (((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q /
                (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1.0);
        }
        const double e = 0.5 * std::erfc(-x / std::sqrt(2.0)) - p;
        const double u = e * std::sqrt(2.0 * M_PI) * std::exp(x * x / 2.0);
        return x - u / (1.0 + x * u / 2.0);
    }

  private:
    std::array<float, kCells + 1> table_{};
};

} // namespace starcensus::census::detail
