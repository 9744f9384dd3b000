#include "census/SystemFractions.h"

#include "photometry/ClassGrid.h"

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <optional>
#include <stdexcept>

namespace starcensus::census {

namespace {

/// The primaries (rows that are a system's primary or single) as row indices, in the three blocks of
/// SystemFractions.h, and where the blocks end.
struct OrderedPrimaries {
    std::vector<std::uint32_t> rows;
    std::size_t resolved_end = 0; // rows[0, resolved_end): primaries with a resolved companion
    std::size_t flagged_end = 0;  // rows[resolved_end, flagged_end): the others with a flagged member
};

OrderedPrimaries orderPrimaries(const SystemCatalog& catalog) {
    constexpr std::uint8_t kUnresolvedFlags =
        SystemFlagHighRuwe | SystemFlagAboveBinaryBand | SystemFlagLiteratureMultiple;
    std::vector<std::uint32_t> blocks[3];
    for (const StellarSystem& system : catalog.systems) {
        const int block = system.members.size() > 1 ? 0 : (system.flags & kUnresolvedFlags) != 0 ? 1 : 2;
        blocks[block].push_back(system.primary);
    }
    OrderedPrimaries ordered;
    ordered.rows.reserve(catalog.systems.size());
    for (const auto& block : blocks) {
        ordered.rows.insert(ordered.rows.end(), block.begin(), block.end());
        if (&block == &blocks[0]) {
            ordered.resolved_end = ordered.rows.size();
        } else if (&block == &blocks[1]) {
            ordered.flagged_end = ordered.rows.size();
        }
    }
    return ordered;
}

/// The tallies of a sample's stars less those of some of them drawn on their own (same draws, radii).
DrawTallies withoutStars(const DrawTallies& all, const DrawTallies& some) {
    if (all.draws != some.draws || all.radii != some.radii || all.counts.size() != some.counts.size()) {
        throw std::invalid_argument("analyseSystems: the census's tallies have other draws or radii");
    }
    DrawTallies rest;
    rest.draws = all.draws;
    rest.radii = all.radii;
    rest.counts.resize(all.counts.size());
    std::transform(all.counts.begin(), all.counts.end(), some.counts.begin(), rest.counts.begin(),
                   std::minus<>());
    return rest;
}

ClassGroup everyCategory() {
    ClassGroup all{"all", {}};
    all.categories.set();
    return all;
}

MultiplicityEstimate multiplicityOf(const ClassGroup& group, std::size_t r, const DrawTallies& primaries,
                                    const DrawTallies& resolved, const DrawTallies& with_unresolved,
                                    int deviates_per_draw, Xoshiro256& random) {
    std::vector<double> n = groupCountsByDraw(primaries, r, group);
    const std::vector<double> m_resolved = groupCountsByDraw(resolved, r, group);
    const std::vector<double> m_flagged = groupCountsByDraw(with_unresolved, r, group);
    MultiplicityEstimate estimate;
    estimate.name = group.name;
    estimate.resolved = multiplicityShare(m_resolved, n, deviates_per_draw, random);
    estimate.with_unresolved = multiplicityShare(m_flagged, n, deviates_per_draw, random);
    estimate.primaries = summarizeDraws(n);
    return estimate;
}

} // namespace

std::vector<double> primaryRankingMasses(std::span<const photometry::CatalogRow> rows,
                                         const photometry::Classifier& classifier, const RowClassRules& rules,
                                         std::vector<std::uint8_t>* above_binary_band) {
    std::vector<double> masses;
    masses.reserve(rows.size());
    for (const photometry::CatalogRow& row : rows) {
        const photometry::Classification result = classifyRow(row, classifier, rules);
        masses.push_back(result.stellar_class == photometry::StellarClass::Evolved
                             ? std::numeric_limits<double>::infinity()
                             : result.mass_msun);
        if (above_binary_band != nullptr) {
            above_binary_band->push_back(
                photometry::hasFlag(result.flags, photometry::ClassificationFlag::AboveBinaryBand) ? 1 : 0);
        }
    }
    return masses;
}

MultiplicityShare multiplicityShare(const std::vector<double>& multiples,
                                    const std::vector<double>& primaries, int deviates_per_draw,
                                    Xoshiro256& random) {
    std::vector<double> shares;
    std::vector<double> population;
    for (std::size_t d = 0; d < primaries.size(); ++d) {
        const double n = primaries[d];
        const double m = multiples[d];
        if (n > 0.0) {
            shares.push_back(m / n);
        }
        for (int k = 0; k < deviates_per_draw; ++k) {
            // Beta(a, b) as Gamma(a) / (Gamma(a) + Gamma(b)).
            const double x = random.gamma(m + 0.5);
            const double y = random.gamma(n - m + 0.5);
            population.push_back(x / (x + y));
        }
    }
    constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    const IntervalSummary none{kNaN, kNaN, kNaN, kNaN, kNaN};
    MultiplicityShare share;
    const bool any_primaries = !shares.empty();
    if (any_primaries) {
        share.population_beta = fitBetaMoments(population);
    }
    share.fraction = {any_primaries ? summarizeDraws(shares) : none,
                      any_primaries ? summarizeDraws(population) : none};
    return share;
}

SystemAnalysis analyseSystems(const SystemCensusInputs& inputs) {
    SystemAnalysis analysis;
    std::vector<std::uint8_t> above_binary_band;
    const std::vector<double> masses =
        primaryRankingMasses(inputs.rows, *inputs.classifier, inputs.rules, &above_binary_band);
    analysis.catalog = findSystems(inputs.rows, masses, above_binary_band, inputs.systems);

    const OrderedPrimaries ordered = orderPrimaries(analysis.catalog);
    if (inputs.sample != nullptr && inputs.sample->grid() == nullptr) {
        throw std::invalid_argument("analyseSystems: the census sample was prepared without a class grid");
    }
    std::optional<photometry::ClassGrid> own_grid;
    const photometry::ClassGrid& grid =
        inputs.sample != nullptr
            ? *inputs.sample->grid()
            : own_grid.emplace(photometry::ClassGrid::fromClassifier(*inputs.classifier));
    DrawSettings draws = inputs.draws;
    draws.progress = nullptr;
    draws.per_star_classes = false; // the system census reads only the counts
    const PreparedSample primary_sample =
        inputs.sample != nullptr
            ? PreparedSample(*inputs.sample, ordered.rows)
            : PreparedSample(inputs.rows, ordered.rows, inputs.radii_pc, inputs.membership, inputs.rules,
                             draws.threads, inputs.classifier, &grid);
    // The three blocks are prefixes of one sample: each block is drawn once and the tallies of the
    // longer prefixes are sums (every star has its own stream, MonteCarlo.h).
    const DrawTallies resolved = drawSample(primary_sample, grid, draws, 0, ordered.resolved_end);
    DrawTallies with_unresolved = resolved;
    appendTallies(with_unresolved,
                  drawSample(primary_sample, grid, draws, ordered.resolved_end, ordered.flagged_end));
    DrawTallies primary_tallies;
    if (inputs.tallies != nullptr && inputs.sample != nullptr) {
        std::vector<std::uint32_t> companions;
        for (std::uint32_t row = 0; row < analysis.catalog.roles.size(); ++row) {
            if (analysis.catalog.roles[row] == SystemRole::Companion) {
                companions.push_back(row);
            }
        }
        const PreparedSample companion_sample(*inputs.sample, companions);
        primary_tallies = withoutStars(*inputs.tallies, drawSample(companion_sample, grid, draws));
    } else {
        primary_tallies = with_unresolved;
        appendTallies(primary_tallies,
                      drawSample(primary_sample, grid, draws, ordered.flagged_end, primary_sample.size()));
    }

    const FractionSettings fraction_settings{.seed = inputs.draws.seed};
    std::vector<PopulationDeviates> population =
        populationDeviatesByRadius(primary_tallies, inputs.groups, fraction_settings);
    std::vector<double> expected;
    for (std::size_t r = 0; r < inputs.radii_pc.size(); ++r) {
        expected.push_back(primary_sample.expectedCount(r));
    }
    const std::vector<RadiusEstimate> fractions =
        estimateFractions(primary_tallies, inputs.radii_pc,
                          hardCutCounts(inputs.rows, inputs.radii_pc, inputs.membership, ordered.rows),
                          expected, inputs.groups, population);
    analysis.primary_priors = estimatePriors(inputs.radii_pc, inputs.groups, std::move(population));
    const ClassGroup every = everyCategory();
    for (std::size_t r = 0; r < inputs.radii_pc.size(); ++r) {
        // Its own stream per radius (stream numbers above the census's own use; common practice).
        Xoshiro256 random(inputs.draws.seed, 0x5157'0000u + r);
        SystemRadiusEstimate estimate;
        estimate.radius_pc = inputs.radii_pc[r];
        estimate.primaries = fractions[r].members;
        estimate.primary_fractions = fractions[r].groups;
        const int deviates = fraction_settings.population_deviates_per_draw;
        estimate.all = multiplicityOf(every, r, primary_tallies, resolved, with_unresolved, deviates, random);
        for (const ClassGroup& group : inputs.groups) {
            estimate.multiplicity.push_back(
                multiplicityOf(group, r, primary_tallies, resolved, with_unresolved, deviates, random));
        }
        analysis.radii.push_back(std::move(estimate));
    }
    return analysis;
}

} // namespace starcensus::census
