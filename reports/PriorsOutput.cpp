#include "reports/PriorsOutput.h"

#include "reports/FractionsOutput.h"

namespace starcensus::reports {

namespace {

constexpr const char* kMethod =
    "Population deviates: per Monte Carlo draw, the expected count of every class is Gamma(n + 1/2) "
    "(Jeffreys prior of a Poisson mean), split over its census categories; fractions are counts over their "
    "sum, so the class fractions of one deviate are Dirichlet(n + 1/2). The Dirichlet, Beta and gamma "
    "distributions here are fitted to the pooled deviates (all draws) by the method of moments; the "
    "Dirichlet pools the class variances into one concentration.";

nlohmann::json summaryJson(const census::DrawSummary& summary) {
    nlohmann::json json = intervalJson(summary.quantiles);
    json["mean"] = summary.mean;
    json["sd"] = summary.sd;
    return json;
}

} // namespace

nlohmann::json priorsJson(const std::vector<census::RadiusPriors>& priors) {
    nlohmann::json radii = nlohmann::json::array();
    for (const auto& radius : priors) {
        nlohmann::json classes = nlohmann::json::object();
        nlohmann::json class_names = nlohmann::json::array();
        for (const auto& group : radius.groups) {
            nlohmann::json fraction = summaryJson(group.fraction);
            fraction["beta"] = {{"alpha", group.fraction_beta.alpha}, {"beta", group.fraction_beta.beta}};
            nlohmann::json density = summaryJson(group.density_pc3);
            density["gamma"] = {{"shape", group.density_gamma.shape}, {"rate_pc3", group.density_gamma.rate}};
            classes[group.name] = {
                {"standard_class", group.standard_class}, {"fraction", fraction}, {"density_pc3", density}};
            if (group.standard_class) {
                class_names.push_back(group.name);
            }
        }
        radii.push_back({{"radius_pc", radius.radius_pc},
                         {"volume_pc3", radius.volume_pc3},
                         {"population_deviates", radius.population_deviates},
                         {"class_fractions",
                          {{"distribution", "dirichlet"},
                           {"classes", class_names},
                           {"alpha", radius.class_fractions.alpha},
                           {"concentration", radius.class_fractions.concentration}}},
                         {"classes", classes}});
    }
    return {{"schema", kPriorsSchema}, {"method", kMethod}, {"radii", radii}};
}

} // namespace starcensus::reports
