#pragma once
// Type fractions, counts and number densities per radius with two kinds of interval:
//  - this volume: measurement noise only. Over the Monte Carlo draws, the share of the objects that are
//    actually inside R (n_g / N, n_g, n_g / V).
//  - population: adds the sampling noise of a finite volume. In each draw, the expected count of every
//    class gets a Gamma(n_c + 1/2) deviate (1/2 is FractionSettings::class_prior_shape) (the Jeffreys prior
//    of a Poisson mean, p(lambda) ∝ lambda^-1/2), shared among the class's census categories as Gamma(n_k +
//    1/(2 m)) for its m categories, so that the category deviates add up to the class deviate. A group's
//    expected count is the sum over its categories and its fraction that sum over the total: the class
//    fractions are then one draw of Dirichlet(n_c + 1/2) (independent gamma deviates normalised by their sum
//    are Dirichlet; the multinomial's Jeffreys prior), every deviate's class fractions sum to one, and a
//    group's fraction is Beta(n_g + a_g, N - n_g + 13/2 - a_g) with a_g its share of the prior (aggregation
//    property). The prior adds 13/2 members in all: for samples of a few dozen stars it draws the large
//    classes' fractions visibly towards the others. The interval is that of the mixture over draws.
#include "census/ClassGroups.h"
#include "census/Intervals.h"
#include "census/MonteCarlo.h"

#include <array>
#include <cstdint>
#include <optional>
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
    // The share among the classified members only (n_g / (N - n_unclassified)), for groups without
    // unclassified categories; absent for groups that contain some.
    std::optional<TwoIntervals> fraction_of_classified;
    TwoIntervals count;
    TwoIntervals density_pc3; // per cubic parsec
};

struct RadiusEstimate {
    double radius_pc = 0.0;
    double volume_pc3 = 0.0;
    double expected_members = 0.0;      // sum of membership probabilities
    std::int64_t hard_cut_members = 0;  // corrected parallax > 1000 / R
    IntervalSummary members;            // total members over the draws
    IntervalSummary classified_members; // members with a class, over the draws
    // Unclassified members per reason (photometry::UnclassifiedReason order), this volume, over the draws.
    std::array<IntervalSummary, photometry::kUnclassifiedReasonCount> unclassified_by_reason;
    std::vector<GroupEstimate> groups;
};

struct FractionSettings {
    int population_deviates_per_draw = 4; // population deviates mixed per Monte Carlo draw
    std::uint64_t seed = 1;               // stream for the population deviates (independent of the draws)
    double class_prior_shape = 0.5;       // gamma prior shape per class (1/2: Jeffreys; dimensionless)
};

double sphereVolumePc3(double radius_pc);

/// The population deviates at one radius for every group, `population_deviates_per_draw` per Monte Carlo
/// draw (draw-major), as described at the top. The stream depends on the radius only, so every caller
/// sees the same deviates for a seed.
struct PopulationDeviates {
    std::vector<std::vector<double>> fraction; // [group][deviate]
    std::vector<std::vector<double>> count;    // [group][deviate], expected member count
    std::vector<double> classified_count;      // [deviate], expected count of the classified members
};

PopulationDeviates populationDeviates(const DrawTallies& tallies, std::size_t radius_index,
                                      const std::vector<ClassGroup>& groups,
                                      const FractionSettings& settings);

/// populationDeviates() at every radius of the tallies, for estimateFractions() and estimatePriors()
/// (Priors.h), which summarise the same deviates.
std::vector<PopulationDeviates> populationDeviatesByRadius(const DrawTallies& tallies,
                                                           const std::vector<ClassGroup>& groups,
                                                           const FractionSettings& settings);

/// Summaries for every radius of the tallies and every group; `population` from
/// populationDeviatesByRadius() with the same groups.
std::vector<RadiusEstimate> estimateFractions(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                                              const std::vector<std::int64_t>& hard_cut_members,
                                              const std::vector<double>& expected_members,
                                              const std::vector<ClassGroup>& groups,
                                              const std::vector<PopulationDeviates>& population);

/// Member count of a group in every draw at one radius ([draw]). The tallies are draw-fastest, so this
/// reads each of the group's categories as one contiguous run.
std::vector<double> groupCountsByDraw(const DrawTallies& tallies, std::size_t radius_index,
                                      const ClassGroup& group);

} // namespace starcensus::census
