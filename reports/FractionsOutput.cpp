#include "reports/FractionsOutput.h"

#include "photometry/base/AtomicOutput.h"

#include <iomanip>
#include <sstream>

namespace starcensus::reports {

namespace {

nlohmann::json twoIntervalsJson(const census::TwoIntervals& intervals) {
    return {{"this_volume", intervalJson(intervals.this_volume)},
            {"population", intervalJson(intervals.population)}};
}

void appendIntervalColumns(std::ostringstream& row, const census::IntervalSummary& interval) {
    row << ',' << interval.median << ',' << interval.lo68 << ',' << interval.hi68 << ',' << interval.lo95
        << ',' << interval.hi95;
}

} // namespace

nlohmann::json intervalJson(const census::IntervalSummary& interval) {
    return {{"median", interval.median},
            {"lo68", interval.lo68},
            {"hi68", interval.hi68},
            {"lo95", interval.lo95},
            {"hi95", interval.hi95}};
}

nlohmann::json fractionsJson(const std::vector<census::RadiusEstimate>& estimates,
                             const nlohmann::json& provenance) {
    nlohmann::json radii = nlohmann::json::array();
    for (const auto& estimate : estimates) {
        nlohmann::json classes = nlohmann::json::object();
        for (const auto& group : estimate.groups) {
            classes[group.name] = {{"fraction", twoIntervalsJson(group.fraction)},
                                   {"count", twoIntervalsJson(group.count)},
                                   {"density_pc3", twoIntervalsJson(group.density_pc3)}};
        }
        radii.push_back({{"radius_pc", estimate.radius_pc},
                         {"volume_pc3", estimate.volume_pc3},
                         {"n_expected", estimate.expected_members},
                         {"n_hard_cut", estimate.hard_cut_members},
                         {"members", intervalJson(estimate.members)},
                         {"classes", classes}});
    }
    return {{"schema", kFractionsSchema}, {"radii", radii}, {"provenance", provenance}};
}

std::string fractionsCsv(const std::vector<census::RadiusEstimate>& estimates) {
    std::ostringstream csv;
    csv << std::setprecision(8) << "radius_pc,class";
    for (const char* quantity : {"fraction", "count", "density_pc3"}) {
        for (const char* kind : {"this_volume", "population"}) {
            for (const char* statistic : {"median", "lo68", "hi68", "lo95", "hi95"}) {
                csv << ',' << quantity << '_' << kind << '_' << statistic;
            }
        }
    }
    csv << '\n';
    for (const auto& estimate : estimates) {
        for (const auto& group : estimate.groups) {
            std::ostringstream row;
            row << std::setprecision(8) << estimate.radius_pc << ',' << group.name;
            for (const auto* quantity : {&group.fraction, &group.count, &group.density_pc3}) {
                appendIntervalColumns(row, quantity->this_volume);
                appendIntervalColumns(row, quantity->population);
            }
            csv << row.str() << '\n';
        }
    }
    return csv.str();
}

void writeJsonFile(const std::filesystem::path& path, const nlohmann::json& document) {
    writeTextFileAtomically(path, document.dump(2) + "\n");
}

} // namespace starcensus::reports
