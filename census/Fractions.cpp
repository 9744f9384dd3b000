#include "census/Fractions.h"

#include "census/Random.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <numbers>

namespace starcensus::census {

namespace {

// Streams for the population deviates sit far from the Monte Carlo's per-star streams.
constexpr std::uint64_t kPopulationStreamBase = 0x5eed000000000000ULL;

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

/// The unclassified categories (one per reason).
std::bitset<photometry::kCategoryCount> unclassifiedCategories() {
    std::bitset<photometry::kCategoryCount> categories;
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        categories[c] = photometry::reasonOfCategory(static_cast<photometry::Category>(c)).has_value();
    }
    return categories;
}

} // namespace

double sphereVolumePc3(double radius_pc) {
    return 4.0 / 3.0 * std::numbers::pi * radius_pc * radius_pc * radius_pc;
}

std::vector<double> groupCountsByDraw(const DrawTallies& tallies, std::size_t radius_index,
                                      const ClassGroup& group) {
    const auto draws = static_cast<std::size_t>(tallies.draws);
    std::vector<double> counts(draws, 0.0);
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        if (group.categories.test(c)) {
            const std::uint32_t* run =
                &tallies.counts[(radius_index * photometry::kCategoryCount + c) * draws];
            for (std::size_t d = 0; d < draws; ++d) {
                counts[d] += run[d];
            }
        }
    }
    return counts;
}

PopulationDeviates populationDeviates(const DrawTallies& tallies, std::size_t radius_index,
                                      const std::vector<ClassGroup>& groups,
                                      const FractionSettings& settings) {
    // Only the groups' sums of the category deviates are reported, and a sum of independent Gamma(a_k)
    // deviates is one Gamma(sum a_k) deviate. So the categories are merged into "atoms", the categories
    // that belong to exactly the same groups, and each atom gets one deviate: the same distribution as
    // one deviate per category, at ~15 deviates per draw instead of kCategoryCount.
    // The last entry of a signature says whether the categories are classified, so that the classified
    // total is a sum of atoms too (the standard groups already separate them: no extra atom).
    const auto unclassified = unclassifiedCategories();
    std::vector<std::size_t> atom_of(photometry::kCategoryCount);
    std::vector<std::vector<bool>> atom_signatures;
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        std::vector<bool> signature(groups.size() + 1);
        for (std::size_t g = 0; g < groups.size(); ++g) {
            signature[g] = groups[g].categories.test(c);
        }
        signature[groups.size()] = !unclassified.test(c);
        const auto found = std::find(atom_signatures.begin(), atom_signatures.end(), signature);
        atom_of[c] = static_cast<std::size_t>(found - atom_signatures.begin());
        if (found == atom_signatures.end()) {
            atom_signatures.push_back(std::move(signature));
        }
    }
    const std::size_t atoms = atom_signatures.size();
    const auto prior_shapes = categoryPriorShapes(settings.class_prior_shape);
    std::vector<double> atom_prior(atoms, 0.0);
    for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
        atom_prior[atom_of[c]] += prior_shapes[c];
    }

    const auto deviates = static_cast<std::size_t>(settings.population_deviates_per_draw);
    const std::size_t total_deviates = static_cast<std::size_t>(tallies.draws) * deviates;
    Xoshiro256 random(settings.seed, kPopulationStreamBase + radius_index);
    PopulationDeviates result;
    result.fraction.assign(groups.size(), std::vector<double>(total_deviates));
    result.count.assign(groups.size(), std::vector<double>(total_deviates));
    result.classified_count.assign(total_deviates, 0.0);
    std::vector<double> atom_count(atoms);
    std::vector<double> expected(atoms);
    for (int d = 0; d < tallies.draws; ++d) {
        std::fill(atom_count.begin(), atom_count.end(), 0.0);
        for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
            atom_count[atom_of[c]] += tallies.count(d, radius_index, static_cast<photometry::Category>(c));
        }
        for (std::size_t k = 0; k < deviates; ++k) {
            double total = 0.0;
            const std::size_t i = static_cast<std::size_t>(d) * deviates + k;
            for (std::size_t a = 0; a < atoms; ++a) {
                expected[a] = random.gamma(atom_count[a] + atom_prior[a]);
                total += expected[a];
                result.classified_count[i] += atom_signatures[a][groups.size()] ? expected[a] : 0.0;
            }
            for (std::size_t g = 0; g < groups.size(); ++g) {
                double sum = 0.0;
                for (std::size_t a = 0; a < atoms; ++a) {
                    sum += atom_signatures[a][g] ? expected[a] : 0.0;
                }
                result.count[g][i] = sum;
                result.fraction[g][i] = sum / total;
            }
        }
    }
    return result;
}

std::vector<PopulationDeviates> populationDeviatesByRadius(const DrawTallies& tallies,
                                                           const std::vector<ClassGroup>& groups,
                                                           const FractionSettings& settings) {
    std::vector<PopulationDeviates> population;
    for (std::size_t r = 0; r < tallies.radii; ++r) {
        population.push_back(populationDeviates(tallies, r, groups, settings));
    }
    return population;
}

std::vector<RadiusEstimate> estimateFractions(const DrawTallies& tallies, const std::vector<double>& radii_pc,
                                              const std::vector<std::int64_t>& hard_cut_members,
                                              const std::vector<double>& expected_members,
                                              const std::vector<ClassGroup>& groups,
                                              const std::vector<PopulationDeviates>& population_by_radius) {
    ClassGroup everything{"all", {}};
    everything.categories.set();
    const auto unclassified = unclassifiedCategories();
    const ClassGroup classified_group{"classified", ~unclassified};
    std::vector<RadiusEstimate> estimates;
    const auto draws = static_cast<std::size_t>(tallies.draws);
    for (std::size_t r = 0; r < radii_pc.size(); ++r) {
        RadiusEstimate estimate;
        estimate.radius_pc = radii_pc[r];
        estimate.volume_pc3 = sphereVolumePc3(radii_pc[r]);
        estimate.expected_members = expected_members[r];
        estimate.hard_cut_members = hard_cut_members[r];
        const std::vector<double> totals = groupCountsByDraw(tallies, r, everything);
        std::vector<double> sorted_totals = totals;
        estimate.members = summarizeDraws(sorted_totals);
        const std::vector<double> classified = groupCountsByDraw(tallies, r, classified_group);
        std::vector<double> sorted_classified = classified;
        estimate.classified_members = summarizeDraws(sorted_classified);
        for (std::size_t reason = 0; reason < photometry::kUnclassifiedReasonCount; ++reason) {
            ClassGroup reason_group{"", {}};
            reason_group.categories.set(
                photometry::unclassifiedCategory(static_cast<photometry::UnclassifiedReason>(reason)));
            std::vector<double> reason_counts = groupCountsByDraw(tallies, r, reason_group);
            estimate.unclassified_by_reason[reason] = summarizeDraws(reason_counts);
        }

        PopulationDeviates population = population_by_radius.at(r); // summarising reorders a copy
        for (std::size_t g = 0; g < groups.size(); ++g) {
            std::vector<double> count = groupCountsByDraw(tallies, r, groups[g]);
            std::vector<double> fraction(draws);
            for (std::size_t d = 0; d < draws; ++d) {
                fraction[d] = totals[d] > 0 ? count[d] / totals[d] : 0.0;
            }
            std::optional<TwoIntervals> of_classified;
            if ((groups[g].categories & unclassified).none()) {
                std::vector<double> share(draws);
                for (std::size_t d = 0; d < draws; ++d) {
                    share[d] = classified[d] > 0 ? count[d] / classified[d] : 0.0;
                }
                std::vector<double> population_share(population.count[g].size());
                for (std::size_t i = 0; i < population_share.size(); ++i) {
                    population_share[i] = population.count[g][i] / population.classified_count[i];
                }
                of_classified = TwoIntervals{summarizeDraws(share), summarizeDraws(population_share)};
            }
            const TwoIntervals counts{summarizeDraws(count), summarizeDraws(population.count[g])};
            const double per_volume = 1.0 / estimate.volume_pc3; // densities are counts over the volume
            estimate.groups.push_back(
                {groups[g].name,
                 {summarizeDraws(fraction), summarizeDraws(population.fraction[g])},
                 of_classified,
                 counts,
                 {scaled(counts.this_volume, per_volume), scaled(counts.population, per_volume)}});
        }
        estimates.push_back(std::move(estimate));
    }
    return estimates;
}

} // namespace starcensus::census
