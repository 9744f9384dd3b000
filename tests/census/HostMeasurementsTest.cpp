#include "census/HostMeasurements.h"

#include "census/Intervals.h"
#include "census/mock/Neighbourhood.h"
#include "photometry/DwarfLocus.h"

#include <doctest/doctest.h>

#include <cmath>
#include <vector>

using namespace starcensus;

TEST_CASE("hosts classified from J and Ks get Teff errors from their 2MASS errors") {
    // Three copies of an L5V dwarf at 10 pc (distance modulus 0; M_J and J-Ks of the shipped Pecaut &
    // Mamajek locus, so J = M_J), no Gaia photometry: the near-infrared path. With J and Ks errors the
    // re-measurements move along the locus and Teff spreads; without them only the 0.1% parallax error is
    // left, which cannot move it off its 0.1-subtype locus point; larger errors spread it more.
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    const double abs_j = classifier.locus().valueAtCode(photometry::LocusQuantity::AbsJMag, 75.0);
    const double j_ks = classifier.locus().valueAtCode(photometry::LocusQuantity::JKsMag, 75.0);
    REQUIRE(std::isfinite(abs_j));
    REQUIRE(std::isfinite(j_ks));
    std::vector<photometry::CatalogRow> rows(3);
    for (std::size_t i = 0; i < rows.size(); ++i) {
        rows[i].parallax_mas = 100.0;
        rows[i].parallax_error_mas = 0.1;
        rows[i].j_mag = abs_j;
        rows[i].ks_mag = abs_j - j_ks;
        rows[i].row_index = static_cast<std::int64_t>(i);
    }
    rows[1].j_error_mag = rows[1].ks_error_mag = 0.03;
    rows[2].j_error_mag = rows[2].ks_error_mag = 0.10;
    const census::MembershipSettings membership;
    const census::PreparedSample sample(rows, {20.0}, membership, census::RowClassRules{}, 1, &classifier);
    census::HostListSettings settings;
    settings.threads = 1;
    const census::HostMeasurements measured =
        census::measureHosts(rows, sample, classifier, membership, settings);
    REQUIRE(measured.rows.size() == 3);
    const double without_errors = measured.uncertainties[0].teff_k;
    const double small_errors = measured.uncertainties[1].teff_k;
    const double large_errors = measured.uncertainties[2].teff_k;
    MESSAGE("teff_error without / with 0.03 / with 0.10 mag J, Ks errors: "
            << without_errors << " / " << small_errors << " / " << large_errors << " K");
    CHECK(without_errors == 0.0);
    CHECK(small_errors > 0.0);
    CHECK(large_errors > small_errors);
    // L dwarfs span ~1000 K over ten subtypes (the same table): 0.1 mag errors cannot spread Teff by more
    // than a few subtypes.
    CHECK(large_errors < 500.0);
}

TEST_CASE("first-order Teff and mass errors agree with the re-measurements where they are used") {
    // A simulated 25 pc neighbourhood (seed 5), the demo's size. The propagated errors are compared with
    // 2000 re-measurements per host (the 68% half-width of 2000 draws scatters by ~2%, of 200 by ~6%).
    census::mock::MockSettings mock_settings;
    const auto mock = census::mock::simulateNeighbourhood(mock_settings, 5);
    const photometry::Classifier& classifier = photometry::Classifier::shipped();
    const census::MembershipSettings membership;
    const census::PreparedSample sample(mock.catalog, {25.0}, membership, census::RowClassRules{}, 2,
                                        &classifier);
    census::HostListSettings settings;
    settings.threads = 2;
    const census::HostMeasurements fast =
        census::measureHosts(mock.catalog, sample, classifier, membership, settings);
    settings.propagate_when_exact = false;
    settings.realisations = 2000;
    const census::HostMeasurements full =
        census::measureHosts(mock.catalog, sample, classifier, membership, settings);
    REQUIRE(fast.rows == full.rows);
    std::vector<double> teff_ratios, mass_ratios;
    int propagated = 0;
    for (std::size_t h = 0; h < fast.rows.size(); ++h) {
        const auto& a = fast.uncertainties[h];
        const auto& b = full.uncertainties[h];
        if (!a.propagated) {
            continue;
        }
        ++propagated;
        if (b.teff_k > 0.0 && a.teff_k > 0.0) {
            teff_ratios.push_back(a.teff_k / b.teff_k);
        }
        if (b.mass_msun > 0.0 && a.mass_msun > 0.0) {
            mass_ratios.push_back(a.mass_msun / b.mass_msun);
        }
    }
    const auto median = [](std::vector<double> v) { return census::sampleQuantile(v, 0.5); };
    const auto quantile = [](std::vector<double> v, double q) { return census::sampleQuantile(v, q); };
    MESSAGE("hosts " << fast.rows.size() << ", propagated " << propagated << "; teff ratio median "
                     << median(teff_ratios) << " [" << quantile(teff_ratios, 0.05) << ", "
                     << quantile(teff_ratios, 0.95) << "]; mass ratio median " << median(mass_ratios) << " ["
                     << quantile(mass_ratios, 0.05) << ", " << quantile(mass_ratios, 0.95) << "]");
    // Measured: 3631 of 4690 hosts propagated; Teff and mass ratios median 1.001, 90% of them within
    // 0.968-1.038. The bar: 5% (the issue's), for the median and for the central 90%.
    CHECK(propagated > static_cast<int>(fast.rows.size()) / 2);
    for (const auto* ratios : {&teff_ratios, &mass_ratios}) {
        CHECK(median(*ratios) == doctest::Approx(1.0).epsilon(0.02));
        CHECK(quantile(*ratios, 0.05) > 0.95);
        CHECK(quantile(*ratios, 0.95) < 1.05);
    }
}
