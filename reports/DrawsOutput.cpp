#include "reports/DrawsOutput.h"

#include "census/Fractions.h"
#include "photometry/catalog/FitsTableWriter.h"

#include <array>
#include <bitset>
#include <cctype>
#include <charconv>
#include <sstream>

namespace starcensus::reports {

namespace {

using photometry::FitsColumn;
using photometry::FitsColumnType;

std::string columnSafe(const std::string& name) {
    std::string safe = name;
    for (char& c : safe) {
        c = std::isalnum(static_cast<unsigned char>(c)) != 0 ? c : '_';
    }
    return safe;
}

std::vector<FitsColumn> drawColumns(const std::vector<census::ClassGroup>& groups) {
    const auto names = drawColumnNames(groups);
    std::vector<FitsColumn> columns = {
        {names[0], FitsColumnType::Float64, "pc", "phys.size.radius", "census radius", 0, {}},
        {names[1], FitsColumnType::Int32, "", "meta.number", "0-based Monte Carlo draw", 0, {}},
        {names[2],
         FitsColumnType::Int32,
         "",
         "meta.number",
         "members within the radius in this draw",
         0,
         {}}};
    for (std::size_t g = 0; g < groups.size(); ++g) {
        columns.push_back({names[3 + g],
                           FitsColumnType::Int32,
                           "",
                           "meta.number",
                           "members of " + groups[g].name + " in this draw",
                           0,
                           {}});
    }
    for (std::size_t g = 0; g < groups.size(); ++g) {
        columns.push_back({names[3 + groups.size() + g],
                           FitsColumnType::Float64,
                           "",
                           "arith.ratio",
                           "fraction of the members that are " + groups[g].name + " (0 if no members)",
                           0,
                           {}});
    }
    return columns;
}

/// Calls row(radius index, draw, members, counts) for every row in file order.
template <class Row>
void forEachDraw(const census::DrawTallies& tallies, const std::vector<census::ClassGroup>& groups,
                 Row&& row) {
    const census::ClassGroup everything{"all", std::bitset<photometry::kCategoryCount>().set()};
    std::vector<std::uint32_t> counts(groups.size());
    for (std::size_t r = 0; r < tallies.radii; ++r) {
        const std::vector<double> members = census::groupCountsByDraw(tallies, r, everything);
        std::vector<std::vector<double>> by_group;
        for (const auto& group : groups) {
            by_group.push_back(census::groupCountsByDraw(tallies, r, group));
        }
        for (int d = 0; d < tallies.draws; ++d) {
            const auto draw = static_cast<std::size_t>(d);
            for (std::size_t g = 0; g < groups.size(); ++g) {
                counts[g] = static_cast<std::uint32_t>(by_group[g][draw]);
            }
            row(r, d, static_cast<std::uint32_t>(members[draw]), counts);
        }
    }
}

double fractionOf(std::uint32_t count, std::uint32_t members) {
    return members > 0 ? static_cast<double>(count) / members : 0.0;
}

} // namespace

std::vector<std::string> drawColumnNames(const std::vector<census::ClassGroup>& groups) {
    std::vector<std::string> names = {"radius_pc", "draw", "members"};
    for (const auto& group : groups) {
        names.push_back("n_" + columnSafe(group.name));
    }
    for (const auto& group : groups) {
        names.push_back("f_" + columnSafe(group.name));
    }
    return names;
}

void writeDrawsTable(const std::filesystem::path& path, const census::DrawTallies& tallies,
                     const std::vector<double>& radii_pc, const std::vector<census::ClassGroup>& groups) {
    photometry::FitsTableWriter writer(
        path, "DRAWS", drawColumns(groups),
        {{"ORIGIN", std::string("starcensus"), "software that wrote this file"},
         {"NDRAWS", std::int64_t{tallies.draws}, "Monte Carlo draws per radius"}});
    auto block = writer.makeBlock();
    forEachDraw(tallies, groups,
                [&](std::size_t r, int d, std::uint32_t members, const std::vector<std::uint32_t>& counts) {
                    block.values<double>(0).push_back(radii_pc[r]);
                    block.values<std::int32_t>(1).push_back(d);
                    block.values<std::int32_t>(2).push_back(static_cast<std::int32_t>(members));
                    for (std::size_t g = 0; g < counts.size(); ++g) {
                        block.values<std::int32_t>(3 + g).push_back(static_cast<std::int32_t>(counts[g]));
                        block.values<double>(3 + counts.size() + g).push_back(fractionOf(counts[g], members));
                    }
                });
    writer.append(block);
    writer.finish();
}

std::string drawsCsv(const census::DrawTallies& tallies, const std::vector<double>& radii_pc,
                     const std::vector<census::ClassGroup>& groups) {
    // Numbers by std::to_chars (shortest text that reads back to the same double): ~60 per row, and
    // ostream formatting was the slowest step of writing the run's outputs.
    std::string csv;
    const auto names = drawColumnNames(groups);
    for (std::size_t i = 0; i < names.size(); ++i) {
        csv += (i == 0 ? "" : ",") + names[i];
    }
    csv += '\n';
    const auto append = [&csv](auto value) {
        std::array<char, 32> text{};
        const auto end = std::to_chars(text.data(), text.data() + text.size(), value).ptr;
        csv.append(text.data(), end);
    };
    forEachDraw(tallies, groups,
                [&](std::size_t r, int d, std::uint32_t members, const std::vector<std::uint32_t>& counts) {
                    append(radii_pc[r]);
                    csv += ',';
                    append(d);
                    csv += ',';
                    append(members);
                    for (const auto count : counts) {
                        csv += ',';
                        append(count);
                    }
                    for (const auto count : counts) {
                        csv += ',';
                        append(fractionOf(count, members));
                    }
                    csv += '\n';
                });
    return csv;
}

} // namespace starcensus::reports
