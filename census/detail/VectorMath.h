#pragma once
// exp and log10 over arrays, for the distance posteriors' 401-node grids and 65-node quantile tables:
// glibc's vector math library (libmvec), 4 values at a time on AVX2 and 2 otherwise, about 5x the
// scalar calls' speed here. Its results differ from the scalar calls' by a few ulp at most (2 ulp over a
// posterior's range of exp arguments, measured; libmvec's documented bound is 4 ulp, from memory); the
// posteriors keep their quantiles as floats, 2^29 times coarser.
#include <span>

namespace starcensus::census::detail {

/// values[i] = e^values[i]. The values must be finite (VectorMath.cpp is built with -ffast-math).
void expInPlace(std::span<double> values);

/// values[i] = log10(values[i]). The values must be finite and positive.
void log10InPlace(std::span<double> values);

} // namespace starcensus::census::detail
