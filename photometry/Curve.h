#pragma once
// Piecewise-linear curves through tabulated points, shared by the reference-model tables.
#include <cstdint>
#include <vector>

namespace starcensus::photometry::detail {

/// y(x) through points with strictly increasing x.
struct Curve {
    std::vector<double> x;
    std::vector<double> y;

    bool empty() const { return x.empty(); }
    /// Linear interpolation; NaN outside [x.front(), x.back()] or for NaN x. A one-point curve answers
    /// only at its own x.
    double at(double at_x) const;
    /// Builds the lookup index that makes at() take O(1) steps instead of a binary search: call once x is
    /// complete (runningMaximumCurve() does); changing x afterwards needs another call.
    void buildIndex();

  private:
    // Equal-width buckets over [x.front(), x.back()]: bucket b starts its search at the first point
    // above the bucket's start, then steps to the exact segment (so rounding cannot misplace it).
    std::vector<std::uint32_t> bucket_first_;
    double bucket_scale_ = 0.0; // buckets per unit of x
};

/// The curve through the points (x[i], y[i]) that are not NaN, taken in the given order, keeping only
/// the points whose x exceeds every x kept before it (a running maximum). Where x(parameter) turns
/// over, this keeps the first (earliest-parameter) branch and drops the reversal until x climbs past
/// its previous maximum again, so the result is single-valued and monotone in x.
Curve runningMaximumCurve(const std::vector<double>& x, const std::vector<double>& y);

} // namespace starcensus::photometry::detail
