#include "reports/HostsOutput.h"

#include "photometry/catalog/FitsTableWriter.h"
#include "reports/SampleOutput.h"
#include "reports/SystemsOutput.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>

namespace starcensus::reports {

namespace {

using photometry::FitsColumn;
using photometry::FitsColumnType;

std::vector<FitsColumn> hostColumns(const census::SystemCatalog* systems) {
    std::vector<FitsColumn> columns = rowIdentityColumns();
    columns.insert(
        columns.end(),
        {
            {"g", FitsColumnType::Float32, "mag", "phot.mag;em.opt", "Gaia G", 0, {}},
            {"abs_g", FitsColumnType::Float32, "mag", "phys.magAbs;em.opt", "M_G from the parallax", 0, {}},
            {"bp_rp", FitsColumnType::Float32, "mag", "phot.color;em.opt.B;em.opt.R", "BP-RP", 0, {}},
            {"class", FitsColumnType::String, "", "src.class", "class from the exact classifier", 12, {}},
            {"spectral_type", FitsColumnType::String, "", "src.spType", "dwarf-equivalent subtype", 8, {}},
            {"teff",
             FitsColumnType::Float32,
             "K",
             "phys.temperature.effective",
             "Teff of the locus at the subtype",
             0,
             {}},
            {"teff_error",
             FitsColumnType::Float32,
             "K",
             "stat.error;phys.temperature.effective",
             "half the central 68% range of Teff over re-measurements",
             0,
             {}},
            {"mass",
             FitsColumnType::Float32,
             "solMass",
             "phys.mass",
             "mass of the locus at the subtype",
             0,
             {}},
            {"mass_error",
             FitsColumnType::Float32,
             "solMass",
             "stat.error;phys.mass",
             "half the central 68% range of the mass over re-measurements",
             0,
             {}},
            {"p_member",
             FitsColumnType::Float32,
             "",
             "stat.probability",
             "probability that the true distance is within the host radius",
             0,
             {}},
            {"class_probability",
             FitsColumnType::Float32,
             "",
             "stat.probability",
             "share of Monte Carlo draws with this class",
             0,
             {}},
        });
    appendSystemMembershipColumns(columns, systems);
    return columns;
}

} // namespace

std::size_t writeHostTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                           const census::PreparedSample& sample, const census::DrawTallies& tallies,
                           const photometry::Classifier& classifier, const census::RowClassRules& rules,
                           const census::HostListSettings& settings, const census::HostMeasurements& measured,
                           const census::SystemCatalog* systems) {
    const std::size_t r = measured.radius_index;
    const std::vector<std::size_t>& hosts = measured.rows;
    const std::vector<census::HostUncertainty>& uncertainties = measured.uncertainties;
    photometry::FitsTableWriter writer(
        path, "HOSTS", hostColumns(systems),
        {{"ORIGIN", std::string("starcensus"), "software that wrote this file"},
         {"HOSTRAD", sample.radii()[r], "[pc] census radius of the host list"},
         {"PMINMEMB", settings.min_probability, "membership probability threshold (inclusive)"},
         {"NREALISE", std::int64_t{settings.realisations}, "re-measurements per host for the errors"}});
    auto block = writer.makeBlock();
    for (std::size_t h = 0; h < hosts.size(); ++h) {
        const auto& row = rows[hosts[h]];
        const photometry::Classification result = census::classifyRow(row, classifier, rules);
        std::size_t c = 0;
        appendRowIdentity(block, c, row);
        for (const double value :
             std::initializer_list<double>{row.g_mag, result.abs_g_mag, result.bp_rp_mag}) {
            block.values<float>(c++).push_back(static_cast<float>(value));
        }
        block.values<std::string>(c++).push_back(std::string(photometry::className(result.stellar_class)));
        block.values<std::string>(c++).push_back(spectralTypeColumn(result));
        for (const double value :
             {result.teff_k, uncertainties[h].teff_k, result.mass_msun, uncertainties[h].mass_msun}) {
            block.values<float>(c++).push_back(static_cast<float>(value));
        }
        block.values<float>(c++).push_back(sample.probabilityWithin(hosts[h], r));
        block.values<float>(c++).push_back(
            static_cast<float>(tallies.star_classes.draws(hosts[h], result.stellar_class)) /
            static_cast<float>(tallies.draws));
        appendSystemMembership(block, c, systems, hosts[h]);
        writer.appendIfFull(block, h + 1);
    }
    writer.append(block);
    writer.finish();
    return hosts.size();
}

} // namespace starcensus::reports
