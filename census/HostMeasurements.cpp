#include "census/HostMeasurements.h"

#include "census/Intervals.h"
#include "census/Random.h"
#include "census/detail/FastNormal.h"
#include "photometry/base/InputError.h"
#include "photometry/base/OptionChecks.h"
#include "photometry/base/Threads.h"

#include <algorithm>
#include <cmath>
#include <optional>
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

/// The first-order errors described in HostMeasurements.h, or nothing where they are not exact enough.
std::optional<HostUncertainty> propagatedUncertainty(const photometry::CatalogRow& row,
                                                     const photometry::Classifier& classifier,
                                                     const DistancePosterior& posterior) {
    using photometry::ClassificationFlag;
    const double colour = row.bp_mag - row.rp_mag;
    const double colour_error = std::hypot(row.bp_error_mag, row.rp_error_mag);
    if (!std::isfinite(colour) || !std::isfinite(colour_error) || !std::isfinite(row.g_mag)) {
        return std::nullopt;
    }
    const double abs_g = row.g_mag - posterior.distanceModulusAt(0.5);
    const photometry::Classification centre = classifier.classifyAbsolute(abs_g, colour);
    constexpr std::uint16_t kOtherPaths = photometry::flagBit(ClassificationFlag::NoColour) |
                                          photometry::flagBit(ClassificationFlag::OutsideLocus) |
                                          photometry::flagBit(ClassificationFlag::NearInfrared) |
                                          photometry::flagBit(ClassificationFlag::JohnsonColour);
    const photometry::ClassifierSettings& settings = classifier.settings();
    constexpr double kBoxSigma = 2.0;
    const bool reaches_infrared =
        std::isfinite(row.j_mag) &&
        row.g_mag - posterior.distanceModulusAt(0.0228) > settings.late_type_abs_g_mag;
    if (centre.stellar_class >= photometry::StellarClass::L || (centre.flags & kOtherPaths) != 0 ||
        !std::isfinite(centre.teff_k) || reaches_infrared ||
        colour + kBoxSigma * colour_error > settings.saturated_bp_rp_mag) {
        return std::nullopt;
    }
    // The class must hold over the box's corners: magnitudes at the posterior's 2-sigma quantiles, with the
    // G error (small beside them) left out.
    for (const double u : {0.0228, 0.9772}) {
        const double corner_g = row.g_mag - posterior.distanceModulusAt(u);
        for (const double sign : {-1.0, 1.0}) {
            const auto corner =
                classifier.classifyAbsolute(corner_g, colour + sign * kBoxSigma * colour_error);
            if (corner.stellar_class != centre.stellar_class || (corner.flags & kOtherPaths) != 0) {
                return std::nullopt;
            }
        }
    }
    const auto bluer = classifier.classifyAbsolute(abs_g, colour - colour_error);
    const auto redder = classifier.classifyAbsolute(abs_g, colour + colour_error);
    const auto nearlyLinear = [](double low, double middle, double high) {
        const double below = middle - low;
        const double above = high - middle;
        constexpr double kSlopeTolerance = 0.25;
        return std::abs(above - below) <= kSlopeTolerance * std::max(std::abs(above), std::abs(below));
    };
    if (!nearlyLinear(bluer.teff_k, centre.teff_k, redder.teff_k) ||
        !nearlyLinear(bluer.mass_msun, centre.mass_msun, redder.mass_msun)) {
        return std::nullopt;
    }
    return HostUncertainty{0.5 * std::abs(redder.teff_k - bluer.teff_k),
                           0.5 * std::abs(redder.mass_msun - bluer.mass_msun), true};
}

HostUncertainty teffMassUncertainty(const photometry::CatalogRow& row,
                                    const photometry::Classifier& classifier,
                                    const MembershipSettings& membership, const HostListSettings& settings,
                                    std::size_t stream) {
    if (!std::isfinite(row.parallax_mas) || !std::isfinite(row.parallax_error_mas)) {
        return {};
    }
    const DistancePosterior posterior(row.parallax_mas, row.parallax_error_mas, membership);
    if (settings.propagate_when_exact) {
        if (const auto propagated = propagatedUncertainty(row, classifier, posterior)) {
            return *propagated;
        }
    }
    Xoshiro256 random(settings.seed, kHostStreamBase + stream);
    const auto realisations = static_cast<std::size_t>(settings.realisations);
    // The Monte Carlo's table-lookup normal deviates (census/detail/FastNormal.h: tails cut at 3.7 sigma,
    // which a 68% range does not see), two per 64 random bits.
    static const detail::FastNormal normal;
    std::vector<double> teff, mass;
    teff.reserve(realisations);
    mass.reserve(realisations);
    // Each realisation sets the distance and the five perturbed bands; the other fields stay the row's.
    photometry::PhotometricInput input = photometricInput(row);
    for (std::size_t k = 0; k < realisations; ++k) {
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
        throw InputError("--hosts-radius: " + numberText(settings.radius_pc) +
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
