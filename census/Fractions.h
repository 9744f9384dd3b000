#pragma once
// Type fractions, counts and number densities per radius with two kinds of interval:
//  - this volume: measurement noise only. Over the Monte Carlo draws, the share of the objects that are
//    actually inside R (n_g / N, n_g, n_g / V).
//  - population: adds the sampling noise of a finite volume. In each draw, the underlying fraction gets a
//    Beta(n_g + 1/2, N - n_g + 1/2) deviate (the Jeffreys prior of a binomial proportion; it is the
//    aggregated marginal of a multinomial-Dirichlet model) and the expected count a Gamma(n_g + 1/2)
//    deviate (the Jeffreys prior of a Poisson mean), so the interval is that of the mixture over draws.
#include "census/ClassGroups.h"
#include "census/Intervals.h"
#include "census/MonteCarlo.h"

#include <cstdint>
#include <string>
#include <vector>

namespace starcensus::census {

/// The same quantity summarised two ways.
struct TwoIntervals {
    IntervalSummary this_volume;
    IntervalSummary population;
};

struct GroupEstimate {
    std::string name;
    TwoIntervals fraction;
    TwoIntervals count;
    TwoIntervals density_pc3; // per cubic parsec
};

struct RadiusEstimate {
    double radius_pc = 0.0;
    double volume_pc3 = 0.0;
    double expected_members = 0.0;     // sum of membership probabilities
    std::int64_t hard_cut_members = 0; // corrected parallax > 1000 / R
    IntervalSummary members;           // total members over the draws
    std::vector<GroupEstimate> groups;
};

struct FractionSettings {
    int population_deviates_per_draw = 4; // Beta/Gamma deviates mixed per Monte Carlo draw
    std::uint64_t seed = 1;               // stream for the population deviates (independent of the draws)
};

double sphereVolumePc3(double radius_pc);

/// The population deviates of one group at one radius, `population_deviates_per_draw` per Monte Carlo draw
/// (draw-major): the underlying fraction, Beta(n + 1/2, N - n + 1/2), and the expected count,
/// Gamma(n + 1/2), for the draw's group count n and member total N. The stream depends on (radius, group),
/// so every caller sees the same deviates for a seed.
struct PopulationDeviates {
    std::vector<double> fraction;
    std::vector<double> count;
};

PopulationDeviates populationDeviates(const DrawTallies& tallies, std::size_t radius_index,
                                      const std::vector<ClassGroup>& groups, std::size_t group_index,
                                      const FractionSettings& settings);

/// Summaries for every radius of the tallies and every group.
std::vector<RadiusEstimate> estimateFractions(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                                              const std::vector<std::int64_t>& hard_cut_members,
                                              const std::vector<double>& expected_members,
                                              const std::vector<ClassGroup>& groups,
                                              const FractionSettings& settings);

/// Member count of a group in one draw.
std::uint32_t groupCount(const DrawTallies& tallies, int draw, std::size_t radius_index,
                         const ClassGroup& group);

} // namespace starcensus::census
