#pragma once
// The hosts of one census radius (objects whose membership probability within it is at least a
// threshold) and the uncertainties of their Teff and mass, for the host list (hosts.fits).
//
// Uncertainties: each host is re-measured `realisations` times: a distance modulus from its membership
// posterior (Membership.h, the same posterior as the Monte Carlo) and G, BP, RP, J and Ks with
// Gaussian errors of the catalogue's sizes (a band without an error is held fixed); each realisation is
// classified with the exact classifier. teff_error and mass_error are half the central 68% range of the
// realisations' Teff and mass (NaN when fewer than half of the realisations have one, e.g. white dwarfs,
// evolved stars and unclassified objects). The spread is that of the measurements through the locus; the
// locus's own scatter is not included.
//
// Where first-order error propagation is exact enough the re-measurements are skipped (propagate_when_exact):
// a dwarf named from BP-RP on the locus, whose code depends on BP-RP alone (bluer than the saturated red
// end, not reaching the near-infrared or Johnson paths), keeps its class over the corners of its 2-sigma
// box in BP-RP and M_G (distance posterior's 2.3% and 97.7% quantiles), and whose Teff and mass are
// nearly linear in BP-RP over +-1 sigma (one-sided slopes within 25%). Its errors are then half the change
// of Teff and mass between BP-RP - sigma and BP-RP + sigma, sigma the BP and RP errors in quadrature: for a
// linear relation that is the half-width of the central 68% of the re-measurements. Six classifications
// instead of `realisations`.
#include "census/Membership.h"
#include "census/MonteCarlo.h"
#include "photometry/Classifier.h"
#include "photometry/catalog/CatalogRow.h"

#include <cstdint>
#include <limits>
#include <span>
#include <vector>

namespace starcensus::census {

struct HostListSettings {
    bool enabled = true;              // false (--no-hosts): no host list
    double radius_pc = 0.0;           // one of the census radii (pc); 0 = the largest
    double min_probability = 0.5;     // membership probability threshold (inclusive)
    int realisations = 200;           // re-measurements per host for the Teff and mass uncertainties
    bool propagate_when_exact = true; // false: re-measure every host (no first-order shortcut)
    std::uint64_t seed = 1;           // random streams (seed, host row)
    unsigned threads = 0;             // 0 = all hardware threads
};

/// The index of settings.radius_pc in radii_pc (the largest for 0); InputError naming --hosts-radius if
/// it is not one of them.
std::size_t hostRadiusIndex(const HostListSettings& settings, const std::vector<double>& radii_pc);

struct HostUncertainty {
    double teff_k = std::numeric_limits<double>::quiet_NaN();
    double mass_msun = std::numeric_limits<double>::quiet_NaN();
    bool propagated = false; // first-order propagation (see the top) instead of re-measurements
};

/// The hosts (indices into the rows) and their re-measured uncertainties. Computed apart from the
/// writing so that the pipeline can run it beside the luminosity-function fit.
struct HostMeasurements {
    std::size_t radius_index = 0;
    std::vector<std::size_t> rows;
    std::vector<HostUncertainty> uncertainties; // one per host
};

/// Selects the hosts and re-measures them (settings.threads threads; the result does not depend on the
/// count); InputError naming --hosts-radius for a radius that is not a census radius.
HostMeasurements measureHosts(std::span<const photometry::CatalogRow> rows, const PreparedSample& sample,
                              const photometry::Classifier& classifier, const MembershipSettings& membership,
                              const HostListSettings& settings);

} // namespace starcensus::census
