#include "census/HostMeasurements.h"

#include "census/Intervals.h"
#include "census/Random.h"
#include "census/detail/FastNormal.h"
#include "photometry/base/InputError.h"
#include "photometry/base/Threads.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

namespace starcensus::census {

namespace {

// Host streams sit far from the Monte Carlo's block streams and the population streams.
constexpr std::uint64_t kHostStreamBase = 0x4057000000000000ULL;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double halfCentral68(std::vector<double>& values, std::size_t realisations) {
    if (2 * values.size() < realisations) {
        return kNaN;
    }
    const auto [low, high] = centralInterval(values, kProbability68);
    return 0.5 * (high - low);
}

double perturbed(double value, double error, float normal_deviate) {
    return std::isfinite(error) ? value + error * normal_deviate : value;
}

HostUncertainty teffMassUncertainty(const photometry::CatalogRow& row,
                                    const photometry::Classifier& classifier,
                                    const MembershipSettings& membership, const HostListSettings& settings,
                                    std::size_t stream) {
    if (!std::isfinite(row.parallax_mas) || !std::isfinite(row.parallax_error_mas)) {
        return {};
    }
    const DistancePosterior posterior(row.parallax_mas, row.parallax_error_mas, membership);
    Xoshiro256 random(settings.seed, kHostStreamBase + stream);
    const auto realisations = static_cast<std::size_t>(settings.realisations);
    // The Monte Carlo's table-lookup normal deviates (census/detail/FastNormal.h: tails cut at 3.7 sigma,
    // which a 68% range does not see), two per 64 random bits.
    static const detail::FastNormal normal;
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

HostMeasurements measureHosts(std::span<const photometry::CatalogRow> rows, const PreparedSample& sample,
                              const photometry::Classifier& classifier, const MembershipSettings& membership,
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
    forEachIndex(hosts.size(), settings.threads, [&](std::size_t h) {
        measured.uncertainties[h] =
            teffMassUncertainty(rows[hosts[h]], classifier, membership, settings, hosts[h]);
    });
    return measured;
}

} // namespace starcensus::census
