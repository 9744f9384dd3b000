#include "census/Priors.h"

#include <cmath>
#include <numeric>
#include <stdexcept>

namespace starcensus::census {

namespace {

struct Moments {
    double mean = 0.0;
    double variance = 0.0;
};

Moments moments(std::span<const double> draws) {
    const auto n = static_cast<double>(draws.size());
    const double mean = std::accumulate(draws.begin(), draws.end(), 0.0) / n;
    double squares = 0.0;
    for (const double value : draws) {
        squares += (value - mean) * (value - mean);
    }
    return {mean, draws.size() > 1 ? squares / (n - 1.0) : 0.0};
}

DrawSummary summarize(std::vector<double> draws) {
    const Moments m = moments(draws);
    return {summarizeDraws(draws), m.mean, std::sqrt(m.variance)};
}

} // namespace

BetaFit fitBetaMoments(std::span<const double> fraction_draws) {
    const Moments m = moments(fraction_draws);
    const double total = m.mean * (1.0 - m.mean) / m.variance - 1.0;
    return {m.mean * total, (1.0 - m.mean) * total};
}

GammaFit fitGammaMoments(std::span<const double> draws) {
    const Moments m = moments(draws);
    return {m.mean * m.mean / m.variance, m.mean / m.variance};
}

DirichletFit fitDirichletMoments(const std::vector<std::vector<double>>& component_draws) {
    std::vector<Moments> components;
    double mean_sum = 0.0;
    for (const auto& draws : component_draws) {
        components.push_back(moments(draws));
        mean_sum += components.back().mean;
    }
    double spread = 0.0;   // sum of m_c (1 - m_c)
    double variance = 0.0; // sum of Var(p_c)
    for (auto& component : components) {
        component.mean /= mean_sum;
        spread += component.mean * (1.0 - component.mean);
        variance += component.variance;
    }
    DirichletFit fit;
    fit.concentration = spread / variance - 1.0;
    for (const auto& component : components) {
        fit.alpha.push_back(component.mean * fit.concentration);
    }
    return fit;
}

BetaFit aggregateDirichlet(const DirichletFit& dirichlet, const std::vector<std::size_t>& components) {
    double alpha = 0.0;
    for (const std::size_t c : components) {
        alpha += dirichlet.alpha.at(c);
    }
    return {alpha, dirichlet.concentration - alpha};
}

std::vector<RadiusPriors> estimatePriors(const std::vector<double>& radii_pc,
                                         const std::vector<ClassGroup>& groups,
                                         std::vector<PopulationDeviates> population) {
    if (groups.size() < photometry::kClassCount) {
        throw std::invalid_argument("estimatePriors: the groups must start with the standard classes");
    }
    std::vector<RadiusPriors> priors;
    for (std::size_t r = 0; r < radii_pc.size(); ++r) {
        RadiusPriors radius;
        radius.radius_pc = radii_pc[r];
        radius.volume_pc3 = sphereVolumePc3(radii_pc[r]);
        PopulationDeviates& deviates = population.at(r);
        radius.population_deviates = deviates.count.front().size();
        for (std::size_t g = 0; g < groups.size(); ++g) {
            std::vector<double>& density = deviates.count[g];
            for (double& value : density) {
                value /= radius.volume_pc3;
            }
            GroupPrior group;
            group.name = groups[g].name;
            group.standard_class = g < photometry::kClassCount;
            group.fraction_beta = fitBetaMoments(deviates.fraction[g]);
            group.density_gamma = fitGammaMoments(density);
            group.density_pc3 = summarize(std::move(density));
            group.fraction = summarize(deviates.fraction[g]);
            radius.groups.push_back(std::move(group));
        }
        deviates.fraction.resize(photometry::kClassCount);
        radius.class_fractions = fitDirichletMoments(deviates.fraction);
        for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
            radius.groups[c].fraction_beta = aggregateDirichlet(radius.class_fractions, {c});
        }
        priors.push_back(std::move(radius));
    }
    return priors;
}

} // namespace starcensus::census
