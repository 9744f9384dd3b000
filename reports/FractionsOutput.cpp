#include "reports/FractionsOutput.h"

#include "photometry/base/AtomicOutput.h"

#include <iomanip>
#include <sstream>

namespace starcensus::reports {

namespace {

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

nlohmann::json twoIntervalsJson(const census::TwoIntervals& intervals) {
    return {{"this_volume", intervalJson(intervals.this_volume)},
            {"population", intervalJson(intervals.population)}};
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
            if (group.fraction_of_classified) {
                classes[group.name]["fraction_of_classified"] =
                    twoIntervalsJson(*group.fraction_of_classified);
            }
        }
        nlohmann::json reasons = nlohmann::json::object();
        for (std::size_t reason = 0; reason < photometry::kUnclassifiedReasonCount; ++reason) {
            reasons[std::string(photometry::kUnclassifiedReasonNames[reason])] =
                intervalJson(estimate.unclassified_by_reason[reason]);
        }
        radii.push_back({{"radius_pc", estimate.radius_pc},
                         {"volume_pc3", estimate.volume_pc3},
                         {"n_expected", estimate.expected_members},
                         {"n_hard_cut", estimate.hard_cut_members},
                         {"members", intervalJson(estimate.members)},
                         {"classified_members", intervalJson(estimate.classified_members)},
                         {"unclassified_by_reason", reasons},
                         {"classes", classes}});
    }
    return {{"schema", kFractionsSchema}, {"radii", radii}, {"provenance", provenance}};
}

void addSpectralTypeAgreement(nlohmann::json& fractions,
                              const std::vector<census::SpectralTypeAgreement>& agreements,
                              census::SpectralTypePolicy policy) {
    auto& radii = fractions.at("radii");
    for (std::size_t r = 0; r < agreements.size() && r < radii.size(); ++r) {
        const census::SpectralTypeAgreement& agreement = agreements[r];
        nlohmann::json confusion = nlohmann::json::object();
        for (std::size_t literature = 0; literature < photometry::kClassCount; ++literature) {
            for (std::size_t photometric = 0; photometric < photometry::kClassCount; ++photometric) {
                if (const std::int64_t count = agreement.confusion[literature][photometric]; count > 0) {
                    confusion[std::string(photometry::kClassNames[literature])]
                             [std::string(photometry::kClassNames[photometric])] = count;
                }
            }
        }
        const std::int64_t classified = agreement.photometricallyClassified();
        const auto share = [](std::int64_t part, std::int64_t whole) {
            return whole > 0 ? nlohmann::json(static_cast<double>(part) / static_cast<double>(whole))
                             : nlohmann::json(nullptr);
        };
        radii[r]["spectral_type_check"] = {
            {"policy", census::spectralTypePolicyName(policy)},
            {"compared", agreement.compared},
            {"agreeing", agreement.agreeing},
            {"agreement", share(agreement.agreeing, agreement.compared)},
            {"photometrically_classified", classified},
            {"agreement_among_classified", share(agreement.agreeing, classified)},
            {"subtype_pairs", agreement.subtype_pairs},
            {"median_abs_subtype_difference", agreement.subtype_pairs > 0
                                                  ? nlohmann::json(agreement.median_abs_subtype_difference)
                                                  : nlohmann::json(nullptr)},
            {"confusion", confusion}};
    }
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
    for (const char* kind : {"this_volume", "population"}) {
        for (const char* statistic : {"median", "lo68", "hi68", "lo95", "hi95"}) {
            csv << ",fraction_of_classified_" << kind << '_' << statistic;
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
            if (group.fraction_of_classified) {
                appendIntervalColumns(row, group.fraction_of_classified->this_volume);
                appendIntervalColumns(row, group.fraction_of_classified->population);
            } else {
                row << ",,,,,,,,,,"; // groups that contain unclassified members have no such share
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
