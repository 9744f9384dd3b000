#pragma once
// Host priors: the population posteriors of the census (census/Fractions.h) as distributions that an
// occurrence-rate or yield tool can sample directly, fitted to the population deviates of the Monte Carlo:
//  - the fractions of the standard classes (a partition of all members) as one Dirichlet;
//  - the fraction of each user group as a Beta (the aggregation of a Dirichlet over any subset of its
//    components is a Beta, so the family is the consistent one for a union of classes);
//  - the number density of every class and group as a gamma distribution (pc^-3).
//
// Fits are by the method of moments on the pooled deviates (all Monte Carlo draws times the population
// deviates per draw). For a Dirichlet with means m_c and concentration a0 = sum a_c, Var(p_c) =
// m_c (1 - m_c) / (a0 + 1); pooling over the classes gives a0 + 1 = sum m_c (1 - m_c) / sum Var(p_c),
// which weights each class by its variance and so fits the large classes best in absolute fraction
// (moment matching of a Dirichlet as in Minka 2000, "Estimating a Dirichlet distribution", Sect. 1, from
// memory; the pooling over classes is ours). The means are the deviates' means, renormalised to sum to
// one (each class's Beta deviates are drawn independently, so their means sum to slightly more than one).
// A Beta and a gamma are fitted the same way: Beta a + b = m (1 - m) / v - 1; gamma shape m^2 / v,
// rate m / v.
#include "census/ClassGroups.h"
#include "census/Fractions.h"
#include "census/Intervals.h"
#include "census/MonteCarlo.h"

#include <span>
#include <string>
#include <vector>

namespace starcensus::census {

/// Beta(alpha, beta) of a fraction.
struct BetaFit {
    double alpha = 0.0;
    double beta = 0.0;
};

/// Gamma(shape, rate) with density x^(shape-1) exp(-rate x); rate has the inverse unit of x (pc^3 for a
/// density in pc^-3).
struct GammaFit {
    double shape = 0.0;
    double rate = 0.0;
};

/// Dirichlet(alpha_1..alpha_K) over the fractions of a partition; concentration = sum of alpha.
struct DirichletFit {
    std::vector<double> alpha;
    double concentration = 0.0;
};

BetaFit fitBetaMoments(std::span<const double> fraction_draws);
GammaFit fitGammaMoments(std::span<const double> draws);

/// component_draws[c] holds draws of the c-th fraction of a partition (all of the same length or not:
/// only their means and variances are used).
DirichletFit fitDirichletMoments(const std::vector<std::vector<double>>& component_draws);

/// The Beta of the summed fractions of `components` under the Dirichlet (aggregation property).
BetaFit aggregateDirichlet(const DirichletFit& dirichlet, const std::vector<std::size_t>& components);

/// Quantiles (median, 68% and 95% central intervals), mean and standard deviation of the deviates.
struct DrawSummary {
    IntervalSummary quantiles;
    double mean = 0.0;
    double sd = 0.0;
};

struct GroupPrior {
    std::string name;
    bool standard_class = false; // one of the partition's classes (its Beta is the Dirichlet marginal)
    DrawSummary fraction;
    BetaFit fraction_beta;
    DrawSummary density_pc3;
    GammaFit density_gamma; // rate in pc^3
};

struct RadiusPriors {
    double radius_pc = 0.0;
    double volume_pc3 = 0.0;
    std::size_t population_deviates = 0; // deviates behind each fit: draws x deviates per draw
    DirichletFit class_fractions;        // over the standard classes, in StellarClass order
    std::vector<GroupPrior> groups;      // the standard classes, then the user groups
};

/// Priors for every radius. `groups` starts with the standard classes (standardClassGroups(), as in
/// CensusSettings::groups); `population` from populationDeviatesByRadius() with those groups (the
/// deviates estimateFractions() summarises).
std::vector<RadiusPriors> estimatePriors(const std::vector<double>& radii_pc,
                                         const std::vector<ClassGroup>& groups,
                                         std::vector<PopulationDeviates> population);

} // namespace starcensus::census
