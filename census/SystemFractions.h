#pragma once
// The census by systems: the systems of the cleaned rows (Systems.h), and per radius the fractions of
// system primaries by class and the multiplicity fraction per primary class, with this-volume and
// population intervals as Fractions.h has them for objects.
//
// Counting: a system primary (the most massive member; a single object is its own primary) is counted
// by its own membership in each Monte Carlo draw: primaries of systems that straddle a radius count
// where the primary lies, companions never count. The multiplicity fraction of a class is the share of
// its primaries that have a resolved companion; "with unresolved candidates" also counts primaries of
// systems with a member flagged as a likely unresolved binary (RUWE, binary band, a literature
// multiplicity column counting more components than were resolved). An unresolved binary
// is one object and one system either way: the object counts and the system-primary fractions do not
// change with the flags.
//
// Pairing of the draws: the primaries are ordered resolved multiples first, then the flagged others,
// then the rest; each star's draws come from its row's stream (seed, row index; MonteCarlo.h), so a
// star has the same outcomes in every tally it is part of, the census by objects included, and the
// ratios per draw are exact. The first two blocks are drawn; all primaries are either those two blocks
// and a draw of the third or, given the census's own tallies, those less a draw of the companions.
#include "census/ClassGroups.h"
#include "census/Fractions.h"
#include "census/Membership.h"
#include "census/MonteCarlo.h"
#include "census/Priors.h"
#include "census/Random.h"
#include "census/RowClassification.h"
#include "census/Systems.h"

#include <span>
#include <string>
#include <vector>

namespace starcensus::census {

/// A multiplicity fraction: its two intervals, and a Beta fitted to the population deviates by the
/// method of moments (Priors.h) for rate tools (alpha = beta = 0 without primaries).
struct MultiplicityShare {
    TwoIntervals fraction;
    BetaFit population_beta;
};

struct MultiplicityEstimate {
    std::string name;                  // the class group of the primaries
    MultiplicityShare resolved;        // share of the primaries with a resolved companion
    MultiplicityShare with_unresolved; // ... or a member flagged as a likely unresolved binary
    IntervalSummary primaries;         // primaries of the group within the radius (this volume)
};

struct SystemRadiusEstimate {
    double radius_pc = 0.0;
    IntervalSummary primaries;                      // system primaries within the radius (this volume)
    std::vector<GroupEstimate> primary_fractions;   // fractions of the system primaries by group
    MultiplicityEstimate all;                       // every primary
    std::vector<MultiplicityEstimate> multiplicity; // per group
};

struct SystemAnalysis {
    SystemCatalog catalog;
    std::vector<SystemRadiusEstimate> radii;
    std::vector<RadiusPriors> primary_priors; // Priors.h fits to the primaries' population deviates
};

struct SystemCensusInputs {
    std::span<const photometry::CatalogRow> rows; // cleaned rows
    const photometry::Classifier* classifier = nullptr;
    RowClassRules rules;
    std::vector<double> radii_pc;
    MembershipSettings membership;
    DrawSettings draws;
    std::vector<ClassGroup> groups;
    SystemSettings systems;
    // Optional: the census's PreparedSample of `rows` (same radii, membership, rules and classifier,
    // prepared with a grid); the primaries' sample is then selected from it instead of prepared again.
    const PreparedSample* sample = nullptr;
    // Optional, with `sample`: the census's draws of it (drawSample with the same seed and draws). Every
    // primary draws from its row's stream, as there, so the primaries' tallies are these less the draws
    // of the other members (the companions, a few per cent of the rows) instead of a draw of them all.
    const DrawTallies* tallies = nullptr;
};

/// The masses that pick each system's primary: classifyRow's locus mass; evolved stars rank first
/// (in a coeval system the star that left the main sequence was the more massive), unknown ones last.
std::vector<double> primaryRankingMasses(std::span<const photometry::CatalogRow> rows,
                                         const photometry::Classifier& classifier, const RowClassRules& rules,
                                         std::vector<std::uint8_t>* above_binary_band = nullptr);

SystemAnalysis analyseSystems(const SystemCensusInputs& inputs);

/// A multiplicity share from paired member counts per draw ([draw]) of multiples and primaries: this
/// volume, the ratio per draw (draws without primaries skipped); population, per draw
/// `deviates_per_draw` Beta(m + 1/2, n - m + 1/2) deviates (the Jeffreys posterior of a binomial share).
MultiplicityShare multiplicityShare(const std::vector<double>& multiples,
                                    const std::vector<double>& primaries, int deviates_per_draw,
                                    Xoshiro256& random);

} // namespace starcensus::census
