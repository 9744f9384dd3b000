#include "census/Fractions.h"

#include "census/Random.h"

#include <array>
#include <cmath>
#include <numbers>
#include <random>

namespace starcensus::census {

namespace {

// Streams for the population deviates sit far from the Monte Carlo's per-block streams.
constexpr std::uint64_t kPopulationStreamBase = 0x5eed000000000000ULL;

double gammaDeviate(Xoshiro256& random, double shape) {
    std::gamma_distribution<double> gamma(shape, 1.0);
    return gamma(random);
}

/// The prior shape of each census category: the class's shape shared equally among its categories.
std::array<double, photometry::kCategoryCount> categoryPriorShapes(double class_shape) {
    std::array<int, photometry::kClassCount> categories_per_class{};
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        ++categories_per_class[static_cast<std::size_t>(
            photometry::classOfCategory(static_cast<photometry::Category>(c)))];
    }
    std::array<double, photometry::kCategoryCount> shapes{};
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        shapes[c] = class_shape / categories_per_class[static_cast<std::size_t>(
                                      photometry::classOfCategory(static_cast<photometry::Category>(c)))];
    }
    return shapes;
}

} // namespace

double sphereVolumePc3(double radius_pc) {
    return 4.0 / 3.0 * std::numbers::pi * radius_pc * radius_pc * radius_pc;
}

std::uint32_t groupCount(const DrawTallies& tallies, int draw, std::size_t radius_index,
                         const ClassGroup& group) {
    std::uint32_t total = 0;
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        if (group.categories.test(c)) {
            total += tallies.count(draw, radius_index, static_cast<photometry::Category>(c));
        }
    }
    return total;
}

PopulationDeviates populationDeviates(const DrawTallies& tallies, std::size_t radius_index,
                                      const std::vector<ClassGroup>& groups,
                                      const FractionSettings& settings) {
    const auto prior_shapes = categoryPriorShapes(settings.class_prior_shape);
    const auto deviates = static_cast<std::size_t>(settings.population_deviates_per_draw);
    const std::size_t total_deviates = static_cast<std::size_t>(tallies.draws) * deviates;
    Xoshiro256 random(settings.seed, kPopulationStreamBase + radius_index);
    PopulationDeviates result;
    result.fraction.assign(groups.size(), std::vector<double>(total_deviates));
    result.count.assign(groups.size(), std::vector<double>(total_deviates));
    std::array<double, photometry::kCategoryCount> expected{};
    for (int d = 0; d < tallies.draws; ++d) {
        for (std::size_t k = 0; k < deviates; ++k) {
            double total = 0.0;
            for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
                const auto n = tallies.count(d, radius_index, static_cast<photometry::Category>(c));
                expected[c] = gammaDeviate(random, n + prior_shapes[c]);
                total += expected[c];
            }
            const std::size_t i = static_cast<std::size_t>(d) * deviates + k;
            for (std::size_t g = 0; g < groups.size(); ++g) {
                double sum = 0.0;
                for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
                    sum += groups[g].categories.test(c) ? expected[c] : 0.0;
                }
                result.count[g][i] = sum;
                result.fraction[g][i] = sum / total;
            }
        }
    }
    return result;
}

std::vector<RadiusEstimate> estimateFractions(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                                              const std::vector<std::int64_t>& hard_cut_members,
                                              const std::vector<double>& expected_members,
                                              const std::vector<ClassGroup>& groups,
                                              const FractionSettings& settings) {
    ClassGroup everything{"all", {}};
    everything.categories.set();
    std::vector<RadiusEstimate> estimates;
    const auto draws = static_cast<std::size_t>(tallies.draws);
    for (std::size_t r = 0; r < radii_pc.size(); ++r) {
        RadiusEstimate estimate;
        estimate.radius_pc = radii_pc[r];
        estimate.volume_pc3 = sphereVolumePc3(radii_pc[r]);
        estimate.expected_members = expected_members[r];
        estimate.hard_cut_members = hard_cut_members[r];
        std::vector<double> totals(draws);
        for (std::size_t d = 0; d < draws; ++d) {
            totals[d] = groupCount(tallies, static_cast<int>(d), r, everything);
        }
        std::vector<double> sorted_totals = totals;
        estimate.members = summarizeDraws(sorted_totals);

        PopulationDeviates population = populationDeviates(tallies, r, groups, settings);
        for (std::size_t g = 0; g < groups.size(); ++g) {
            std::vector<double> fraction(draws), count(draws), density(draws);
            for (std::size_t d = 0; d < draws; ++d) {
                const double n = groupCount(tallies, static_cast<int>(d), r, groups[g]);
                fraction[d] = totals[d] > 0 ? n / totals[d] : 0.0;
                count[d] = n;
                density[d] = n / estimate.volume_pc3;
            }
            std::vector<double> population_density = population.count[g];
            for (double& value : population_density) {
                value /= estimate.volume_pc3;
            }
            estimate.groups.push_back({groups[g].name,
                                       {summarizeDraws(fraction), summarizeDraws(population.fraction[g])},
                                       {summarizeDraws(count), summarizeDraws(population.count[g])},
                                       {summarizeDraws(density), summarizeDraws(population_density)}});
        }
        estimates.push_back(std::move(estimate));
    }
    return estimates;
}

} // namespace starcensus::census
