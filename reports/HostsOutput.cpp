#include "reports/HostsOutput.h"

#include "census/Intervals.h"
#include "census/Random.h"
#include "census/detail/FastNormal.h"
#include "photometry/FitsTableWriter.h"
#include "photometry/InputError.h"
#include "photometry/Threads.h"
#include "reports/SampleOutput.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>

namespace starcensus::reports {

namespace {

using photometry::FitsColumn;
using photometry::FitsColumnType;

// Host streams sit far from the Monte Carlo's block streams and the population streams.
constexpr std::uint64_t kHostStreamBase = 0x4057000000000000ULL;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double halfCentral68(std::vector<double>& values, std::size_t realisations) {
    if (2 * values.size() < realisations) {
        return kNaN;
    }
    const auto [low, high] = census::centralInterval(values, census::kProbability68);
    return 0.5 * (high - low);
}

double perturbed(double value, double error, float normal_deviate) {
    return std::isfinite(error) ? value + error * normal_deviate : value;
}

HostUncertainty teffMassUncertainty(const photometry::CatalogRow& row,
                                    const photometry::Classifier& classifier,
                                    const census::MembershipSettings& membership,
                                    const HostListSettings& settings, std::size_t stream) {
    if (!std::isfinite(row.parallax_mas) || !std::isfinite(row.parallax_error_mas)) {
        return {};
    }
    const census::DistancePosterior posterior(row.parallax_mas, row.parallax_error_mas, membership);
    census::Xoshiro256 random(settings.seed, kHostStreamBase + stream);
    const auto realisations = static_cast<std::size_t>(settings.realisations);
    // The Monte Carlo's table-lookup normal deviates (census/detail/FastNormal.h: tails cut at 3.7 sigma,
    // which a 68% range does not see), two per 64 random bits.
    static const census::detail::FastNormal normal;
    std::vector<double> teff, mass;
    teff.reserve(realisations);
    mass.reserve(realisations);
    for (std::size_t k = 0; k < realisations; ++k) {
        photometry::PhotometricInput input = photometricInput(row);
        input.distance_modulus_mag = posterior.distanceModulusAt(random.uniform());
        const std::uint64_t bits = random();
        input.g_mag = perturbed(row.g_mag, row.g_error_mag, normal(static_cast<std::uint32_t>(bits)));
        input.bp_mag =
            perturbed(row.bp_mag, row.bp_error_mag, normal(static_cast<std::uint32_t>(bits >> 32)));
        const std::uint64_t more_bits = random();
        input.rp_mag = perturbed(row.rp_mag, row.rp_error_mag, normal(static_cast<std::uint32_t>(more_bits)));
        input.j_mag =
            perturbed(row.j_mag, row.j_error_mag, normal(static_cast<std::uint32_t>(more_bits >> 32)));
        input.ks_mag = perturbed(row.ks_mag, row.ks_error_mag, normal(static_cast<std::uint32_t>(random())));
        const photometry::Classification result = classifier.classify(input);
        if (std::isfinite(result.teff_k)) {
            teff.push_back(result.teff_k);
        }
        if (std::isfinite(result.mass_msun)) {
            mass.push_back(result.mass_msun);
        }
    }
    return {halfCentral68(teff, realisations), halfCentral68(mass, realisations)};
}

std::vector<FitsColumn> hostColumns() {
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
    return columns;
}

} // namespace

std::size_t hostRadiusIndex(const HostListSettings& settings, const std::vector<double>& radii_pc) {
    if (settings.radius_pc == 0.0) {
        return radii_pc.size() - 1;
    }
    const auto found = std::find(radii_pc.begin(), radii_pc.end(), settings.radius_pc);
    if (found == radii_pc.end()) {
        char text[32];
        std::snprintf(text, sizeof text, "%g", settings.radius_pc);
        throw InputError(std::string("--hosts-radius: ") + text +
                         " pc is not one of the census radii (--radius)");
    }
    return static_cast<std::size_t>(found - radii_pc.begin());
}

HostMeasurements measureHosts(std::span<const photometry::CatalogRow> rows,
                              const census::PreparedSample& sample, const photometry::Classifier& classifier,
                              const census::MembershipSettings& membership,
                              const HostListSettings& settings) {
    HostMeasurements measured;
    measured.radius_index = hostRadiusIndex(settings, sample.radii());
    for (std::size_t s = 0; s < rows.size(); ++s) {
        if (sample.probabilityWithin(s, measured.radius_index) >= settings.min_probability) {
            measured.rows.push_back(s);
        }
    }
    // Each host has its own stream, so the result does not depend on the thread count.
    const std::vector<std::size_t>& hosts = measured.rows;
    measured.uncertainties.resize(hosts.size());
    forEachInterleaved(hosts.size(), settings.threads, [&](std::size_t h) {
        measured.uncertainties[h] =
            teffMassUncertainty(rows[hosts[h]], classifier, membership, settings, hosts[h]);
    });
    return measured;
}

std::size_t writeHostTable(const std::filesystem::path& path, std::span<const photometry::CatalogRow> rows,
                           const census::PreparedSample& sample, const census::DrawTallies& tallies,
                           const photometry::Classifier& classifier, double min_parallax_snr_to_classify,
                           const census::MembershipSettings& membership, const HostListSettings& settings,
                           const HostMeasurements& measured) {
    const std::size_t r = measured.radius_index;
    const std::vector<std::size_t>& hosts = measured.rows;
    const std::vector<HostUncertainty>& uncertainties = measured.uncertainties;
    photometry::FitsTableWriter writer(
        path, "HOSTS", hostColumns(),
        {{"ORIGIN", std::string("starcensus"), "software that wrote this file"},
         {"HOSTRAD", sample.radii()[r], "[pc] census radius of the host list"},
         {"PMINMEMB", settings.min_probability, "membership probability threshold (inclusive)"},
         {"NREALISE", std::int64_t{settings.realisations}, "re-measurements per host for the errors"}});
    auto block = writer.makeBlock();
    for (std::size_t h = 0; h < hosts.size(); ++h) {
        const auto& row = rows[hosts[h]];
        const photometry::Classification result =
            classifyRow(row, classifier, membership, min_parallax_snr_to_classify);
        std::size_t c = 0;
        appendRowIdentity(block, c, row);
        for (const double value : {row.g_mag, result.abs_g_mag, result.bp_rp_mag}) {
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
            static_cast<float>(tallies.star_classes[hosts[h] * photometry::kClassCount +
                                                    static_cast<std::size_t>(result.stellar_class)]) /
            static_cast<float>(tallies.draws));
    }
    writer.append(block);
    writer.finish();
    return hosts.size();
}

} // namespace starcensus::reports
