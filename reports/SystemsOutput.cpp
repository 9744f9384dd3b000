#include "reports/SystemsOutput.h"

#include "reports/FractionsOutput.h"
#include "reports/PriorsOutput.h"

#include <algorithm>
#include <span>
#include <string>

namespace starcensus::reports {

namespace {

using photometry::FitsColumnType;

// Widest member list written in full; longer ones end in "..." (the members' own rows in sample.fits
// carry their system_id either way). The column is as wide as the run's longest list up to this, so a
// sample of singles does not carry 200 blank bytes a row (4x10^5 systems: 112 MB -> 40 MB).
constexpr std::size_t kMaxMembersWidth = 200;

nlohmann::json shareJson(const census::MultiplicityShare& share) {
    nlohmann::json json = twoIntervalsJson(share.fraction);
    json["population_beta"] = {{"alpha", share.population_beta.alpha}, {"beta", share.population_beta.beta}};
    return json;
}

nlohmann::json multiplicityJson(const census::MultiplicityEstimate& estimate) {
    return {{"primaries", intervalJson(estimate.primaries)},
            {"resolved", shareJson(estimate.resolved)},
            {"with_unresolved_candidates", shareJson(estimate.with_unresolved)}};
}

std::string sourceIdText(const photometry::CatalogRow& row) {
    return row.source_id == photometry::kMissingSourceId
               ? std::to_string(row.file_index) + ":" + std::to_string(row.row_index)
               : std::to_string(row.source_id);
}

/// The members' ids, primary first, separated by blanks, cut to kMaxMembersWidth with "...".
std::string membersText(const census::StellarSystem& system, std::span<const photometry::CatalogRow> rows) {
    std::string members;
    for (const std::uint32_t member : system.members) {
        if (!members.empty()) {
            members += ' ';
        }
        members += sourceIdText(rows[member]);
        if (members.size() > kMaxMembersWidth) {
            return members.substr(0, kMaxMembersWidth - 3) + "...";
        }
    }
    return members;
}

} // namespace

std::string_view systemRoleName(census::SystemRole role) {
    switch (role) {
    case census::SystemRole::Primary:
        return "primary";
    case census::SystemRole::Companion:
        return "companion";
    case census::SystemRole::Single:
        break;
    }
    return "single";
}

void appendSystemMembershipColumns(std::vector<photometry::FitsColumn>& columns,
                                   const census::SystemCatalog* systems) {
    if (systems == nullptr) {
        return;
    }
    columns.insert(
        columns.end(),
        {
            {"system_id",
             FitsColumnType::Int64,
             "",
             "meta.id;src",
             "id of the system in systems.fits",
             0,
             {}},
            {"system_role", FitsColumnType::String, "", "meta.code", "single, primary or companion", 9, {}},
            {"system_flags",
             FitsColumnType::UInt8,
             "",
             "meta.code",
             "bits: 1 RUWE above the limit, 2 above the binary band (likely unresolved), 4 a pair refused "
             "as a chance alignment, 8 literature components above the members",
             0,
             {}},
        });
}

void appendSystemMembership(photometry::FitsRowBlock& block, std::size_t& column,
                            const census::SystemCatalog* systems, std::size_t row) {
    if (systems == nullptr) {
        return;
    }
    block.values<std::int64_t>(column++).push_back(systems->system_ids[row]);
    block.values<std::string>(column++).push_back(std::string(systemRoleName(systems->roles[row])));
    block.values<std::uint8_t>(column++).push_back(systems->flags[row]);
}

void writeSystemsTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                       const census::SystemCatalog& systems, const photometry::Classifier& classifier,
                       const census::RowClassRules& rules) {
    std::size_t members_width = 1;
    for (const census::StellarSystem& system : systems.systems) {
        members_width = std::max(members_width, membersText(system, rows).size());
    }
    std::vector<photometry::FitsColumn> columns = {
        {"system_id", FitsColumnType::Int64, "", "meta.id;meta.main", "system identifier", 0, {}},
        {"n_members", FitsColumnType::Int32, "", "meta.number", "resolved members (objects)", 0, {}},
        {"primary_source_id", FitsColumnType::Int64, "", "meta.id",
         "source_id of the primary, the most massive member (-1: none)", 0, -1},
        {"primary_class", FitsColumnType::String, "", "src.spType", "class of the primary", 12, {}},
        {"primary_mass", FitsColumnType::Float32, "solMass", "phys.mass", "locus mass of the primary", 0, {}},
        {"members",
         FitsColumnType::String,
         "",
         "meta.id",
         "source_ids of the members, primary first, then by separation (file:row without one)",
         static_cast<int>(members_width),
         {}},
        {"ra", FitsColumnType::Float64, "deg", "pos.eq.ra", "right ascension of the primary", 0, {}},
        {"dec", FitsColumnType::Float64, "deg", "pos.eq.dec", "declination of the primary", 0, {}},
        {"parallax", FitsColumnType::Float64, "mas", "pos.parallax.trig", "parallax of the primary", 0, {}},
        {"widest_separation",
         FitsColumnType::Float64,
         "AU",
         "phys.size;pos.angDistance",
         "largest projected separation of a member from the primary",
         0,
         {}},
        {"widest_separation_angle",
         FitsColumnType::Float64,
         "arcsec",
         "pos.angDistance",
         "the same pair's angular separation",
         0,
         {}},
        {"chance_probability",
         FitsColumnType::Float32,
         "",
         "stat.probability",
         "largest chance-alignment probability of the pairs that joined the system (shifted sky)",
         0,
         {}},
        {"flags",
         FitsColumnType::UInt8,
         "",
         "meta.code",
         "union of the members' system_flags (1 RUWE, 2 binary band, 4 chance pair refused, 8 literature)",
         0,
         {}},
    };
    photometry::FitsTableWriter writer(
        path, "SYSTEMS", std::move(columns),
        {{"ORIGIN", std::string("starcensus"), "software that wrote this file"},
         {"NPAIRS", static_cast<std::int64_t>(systems.pairs.size()),
          "candidate pairs (before the chance test)"},
         {"NSHIFTED", systems.shifted_pairs_per_sky, "mean candidate pairs in one shifted sky"}});
    auto block = writer.makeBlock();
    for (std::size_t s = 0; s < systems.systems.size(); ++s) {
        const census::StellarSystem& system = systems.systems[s];
        const photometry::CatalogRow& primary = rows[system.primary];
        const photometry::Classification result = census::classifyRow(primary, classifier, rules);
        std::size_t c = 0;
        block.values<std::int64_t>(c++).push_back(system.id);
        block.values<std::int32_t>(c++).push_back(static_cast<std::int32_t>(system.members.size()));
        block.values<std::int64_t>(c++).push_back(
            primary.source_id == photometry::kMissingSourceId ? -1 : primary.source_id);
        block.values<std::string>(c++).push_back(std::string(photometry::className(result.stellar_class)));
        block.values<float>(c++).push_back(static_cast<float>(result.mass_msun));
        block.values<std::string>(c++).push_back(membersText(system, rows));
        for (const double value : {primary.ra_deg, primary.dec_deg, primary.parallax_mas,
                                   system.widest_separation_au, system.widest_separation_arcsec}) {
            block.values<double>(c++).push_back(value);
        }
        block.values<float>(c++).push_back(static_cast<float>(system.largest_chance_probability));
        block.values<std::uint8_t>(c++).push_back(system.flags);
        writer.appendIfFull(block, s + 1);
    }
    writer.append(block);
    writer.finish();
}

void addSystemsToFractions(nlohmann::json& fractions, const census::SystemAnalysis& analysis,
                           const census::SystemSettings& settings) {
    const census::SystemCatalog& catalog = analysis.catalog;
    std::int64_t joined = 0;
    std::int64_t multiples = 0;
    for (const auto& pair : catalog.pairs) {
        joined += pair.joined ? 1 : 0;
    }
    for (const auto& system : catalog.systems) {
        multiples += system.members.size() > 1 ? 1 : 0;
    }
    fractions["system_finding"] = {
        {"objects", catalog.system_ids.size()},
        {"systems", catalog.systems.size()},
        {"multiple_systems", multiples},
        {"candidate_pairs", catalog.pairs.size()},
        {"joined_pairs", joined},
        {"shifted_sky_pairs_per_sky", catalog.shifted_pairs_per_sky},
        {"max_projected_separation_pc", settings.max_projected_separation_pc},
        {"max_search_angle_deg", settings.max_search_angle_deg},
        {"max_chance_probability", settings.max_chance_probability},
        {"unresolved_ruwe", settings.unresolved_ruwe},
        {"counting", "system primaries (the most massive member; singles are their own) counted by their own "
                     "membership in each draw; companions are not counted"}};
    auto& radii = fractions.at("radii");
    for (std::size_t r = 0; r < analysis.radii.size() && r < radii.size(); ++r) {
        const census::SystemRadiusEstimate& estimate = analysis.radii[r];
        nlohmann::json primary_classes = nlohmann::json::object();
        nlohmann::json multiplicity = nlohmann::json::object();
        for (const auto& group : estimate.primary_fractions) {
            primary_classes[group.name] = {{"fraction", twoIntervalsJson(group.fraction)},
                                           {"count", twoIntervalsJson(group.count)}};
        }
        for (const auto& group : estimate.multiplicity) {
            multiplicity[group.name] = multiplicityJson(group);
        }
        radii[r]["systems"] = {{"primaries", intervalJson(estimate.primaries)},
                               {"primary_classes", primary_classes},
                               {"multiplicity_all", multiplicityJson(estimate.all)},
                               {"multiplicity", multiplicity}};
    }
}

void addSystemPriors(nlohmann::json& priors, const census::SystemAnalysis& analysis) {
    const nlohmann::json primaries = priorsJson(analysis.primary_priors);
    auto& radii = priors.at("radii");
    for (std::size_t r = 0; r < radii.size() && r < primaries.at("radii").size(); ++r) {
        nlohmann::json system_priors = primaries["radii"][r];
        system_priors.erase("radius_pc");
        system_priors.erase("volume_pc3");
        nlohmann::json multiplicity = nlohmann::json::object();
        for (const auto& group : analysis.radii[r].multiplicity) {
            multiplicity[group.name] = {{"resolved_beta",
                                         {{"alpha", group.resolved.population_beta.alpha},
                                          {"beta", group.resolved.population_beta.beta}}},
                                        {"with_unresolved_candidates_beta",
                                         {{"alpha", group.with_unresolved.population_beta.alpha},
                                          {"beta", group.with_unresolved.population_beta.beta}}}};
        }
        system_priors["multiplicity"] = multiplicity;
        radii[r]["system_primaries"] = system_priors;
    }
}

} // namespace starcensus::reports
