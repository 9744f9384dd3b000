#pragma once
// Summaries of uncertain quantities: sample quantiles of Monte Carlo draws, and exact Poisson confidence
// limits for small counts.
#include <array>
#include <span>
#include <vector>

namespace starcensus::census {

/// Median and the central 68% and 95% intervals of a quantity.
struct IntervalSummary {
    double median = 0.0;
    double lo68 = 0.0;
    double hi68 = 0.0;
    double lo95 = 0.0;
    double hi95 = 0.0;
};

/// Central probability masses of the two intervals: 68.27% and 95.45% (the Gaussian 1 and 2 sigma).
inline constexpr double kProbability68 = 0.682689492137086;
inline constexpr double kProbability95 = 0.954499736103642;

/// Quantile q in [0, 1] of `values`, linear between order statistics (Hyndman & Fan 1996, definition 7,
/// the default of R and NumPy). `values` is reordered.
double sampleQuantile(std::span<double> values, double q);

/// Median, 68% and 95% central intervals of the draws (reorders them).
IntervalSummary summarizeDraws(std::span<double> draws);

/// Every quantile of `summary` multiplied by `factor` > 0: the summary of the draws times that factor
/// (quantiles commute with a positive scaling, up to rounding), without selecting again.
IntervalSummary scaled(const IntervalSummary& summary, double factor);

/// The central interval holding `probability` of the values: the quantiles (1 -+ probability) / 2
/// (reorders them; NaN for none).
std::array<double, 2> centralInterval(std::span<double> values, double probability);

/// Exact (Garwood) confidence limits for a Poisson mean given an observed count n, as tabulated by
/// Gehrels 1986, ApJ 303, 336 (Eqs. 1-2 with chi-square / gamma quantiles): lower = Q_gamma(n, a/2),
/// upper = Q_gamma(n + 1, 1 - a/2). The median is the gamma(n + 1/2) median (Jeffreys posterior).
IntervalSummary poissonInterval(double count);

} // namespace starcensus::census
