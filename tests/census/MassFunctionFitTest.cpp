#include "census/MassFunctionFit.h"
#include "census/LuminosityFunction.h"
#include "census/mock/Neighbourhood.h"
#include "tests/census/MockSample.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

using namespace starcensus::census;
using namespace starcensus::census::mock;

namespace {

const MagnitudeLimits kGaiaLimits{20.7, 3.0}; // the defaults: G = 20.7 faint, 3 bright

const LuminosityModel& shippedModel() {
    static const LuminosityModel model(ImfSettings{}.mass_min_msun, ImfSettings{}.mass_max_msun, {},
                                       starcensus::photometry::shippedModelPhotometry());
    return model;
}

// A mock of single objects (the model has no unresolved binaries) fitted with the family it was drawn
// from, over the default fit range M_G 5-16 at the mock's full radius.
MassFunctionFitResult fitSingleStarMock(ImfFamily family, double radius_pc, std::uint64_t seed) {
    MockSettings settings;
    settings.radius_max_pc = radius_pc;
    settings.binary_fraction = 0.0;
    settings.imf.family = family;
    const MockResult mock = simulateNeighbourhood(settings, seed);
    const auto stars = testing::truthStars(mock);
    const auto table = estimateLuminosityFunction(stars, radius_pc, kGaiaLimits, 0.01, {});
    MassFunctionFitSettings fit_settings;
    fit_settings.family = family;
    return fitMassFunction(table, shippedModel(), radius_pc, kGaiaLimits, fit_settings);
}

// The parameters the mocks are drawn with: density 0.1 pc^-3 (MockSettings), and the IMF defaults.
std::vector<double> truthOf(ImfFamily family) {
    const ImfSettings imf;
    if (family == ImfFamily::Chabrier2003) {
        return {0.1, imf.chabrier_peak_mass_msun, imf.chabrier_sigma_dex};
    }
    return {0.1, imf.kroupa_alpha_mid, imf.kroupa_alpha_high};
}

} // namespace

TEST_CASE("the fit recovers the IMF parameters of single-star mocks, with honest errors (both forms)") {
    for (const ImfFamily family : {ImfFamily::Kroupa2001, ImfFamily::Chabrier2003}) {
        CAPTURE(fitModelName(family));
        const std::vector<double> truth = truthOf(family);
        // One 40 pc mock: every parameter within 3 of its fitted errors.
        const MassFunctionFitResult fit = fitSingleStarMock(family, 40.0, 2024);
        REQUIRE(fit.converged);
        CHECK(fit.message == "converged");
        CHECK(fit.bins_used == 22); // M_G 5-16 in 0.5 mag bins
        for (std::size_t k = 0; k < truth.size(); ++k) {
            CAPTURE(fit.names[k]);
            CHECK(std::abs(fit.values[k] - truth[k]) < 3.0 * fit.errors[k]);
        }
        // A good fit of the right model: the Cash statistic's p-value is not extreme.
        CHECK(fit.p_value > 0.001);

        // Coverage over 40 seeded 30 pc mocks: the 1-sigma intervals should hold the truth 68.3% of the
        // time; with 40 mocks the binomial standard deviation is 0.074, so we accept 0.46-0.90 (3 sigma).
        // The pulls (fit - truth) / error should have unit rms: the sum of 40 squared pulls lies within
        // the 0.1% and 99.9% points of chi-square with 40 dof, 17.9 and 73.4 (standard chi-square table;
        // from memory), i.e. an rms of 0.67-1.35.
        constexpr int kMocks = 40;
        std::vector<int> covered(truth.size(), 0);
        std::vector<double> pull_squares(truth.size(), 0.0);
        for (int seed = 1; seed <= kMocks; ++seed) {
            const MassFunctionFitResult mock_fit =
                fitSingleStarMock(family, 30.0, static_cast<std::uint64_t>(seed));
            REQUIRE(mock_fit.converged);
            for (std::size_t k = 0; k < truth.size(); ++k) {
                const double pull = (mock_fit.values[k] - truth[k]) / mock_fit.errors[k];
                covered[k] += std::abs(pull) < 1.0 ? 1 : 0;
                pull_squares[k] += pull * pull;
            }
        }
        for (std::size_t k = 0; k < truth.size(); ++k) {
            CAPTURE(fit.names[k]);
            const double coverage = static_cast<double>(covered[k]) / kMocks;
            const double rms = std::sqrt(pull_squares[k] / kMocks);
            MESSAGE(fitModelName(family)
                    << " " << fit.names[k] << ": 1-sigma coverage " << coverage << ", pull rms " << rms);
            CHECK(coverage >= 0.46);
            CHECK(coverage <= 0.90);
            CHECK(rms > 0.67);
            CHECK(rms < 1.35);
        }
    }
}

TEST_CASE("a mock drawn with the Chabrier (2003) single-star IMF returns m_c = 0.079, sigma = 0.69") {
    // Chabrier 2003, PASP 115, 763, Table 1, single objects (from memory): m_c = 0.079 Msun,
    // sigma = 0.69 dex; the simulator's defaults (census/InitialMassFunction.h).
    const MassFunctionFitResult fit = fitSingleStarMock(ImfFamily::Chabrier2003, 40.0, 7);
    REQUIRE(fit.converged);
    REQUIRE(fit.names[1] == "peak_mass_msun");
    REQUIRE(fit.names[2] == "sigma_dex");
    MESSAGE("m_c = " << fit.values[1] << " +- " << fit.errors[1] << ", sigma = " << fit.values[2] << " +- "
                     << fit.errors[2] << ", density = " << fit.values[0] << " +- " << fit.errors[0]);
    CHECK(std::abs(fit.values[1] - 0.079) < 2.0 * fit.errors[1]);
    CHECK(std::abs(fit.values[2] - 0.69) < 2.0 * fit.errors[2]);
    CHECK(std::abs(fit.values[0] - 0.1) < 2.0 * fit.errors[0]);
    // The errors are informative: a 40 pc sample pins m_c to ~15% and sigma to ~0.04 dex.
    CHECK(fit.errors[1] < 0.2 * 0.079);
    CHECK(fit.errors[2] < 0.06);
}

TEST_CASE("the luminosity function of a realistic mock peaks at M_G 10-12") {
    // A default mock (25 pc, Kroupa 2001 IMF, 30% unresolved binaries) as the pipeline sees it:
    // parallax distances, membership weights and the exact classifier. The Gaia main-sequence LF has a
    // broad maximum at M_G ~ 10-12 (GCNS, Smart et al. 2021; from memory), and the raw 10 pc counts of
    // Reyle et al. 2021 peak in the 1-mag bins M_G 9-12 (shared/reference/published-figures.md section 5).
    const MockResult mock = simulateNeighbourhood(MockSettings{}, 31);
    const PreparedSample sample(mock.catalog, {25.0}, {}, RowClassRules{}, 2);
    const auto stars = testing::classifiedStars(mock, sample, 0);
    LuminositySettings settings;
    settings.bin_width_mag = 1.0; // as in the published comparison
    const auto table = estimateLuminosityFunction(stars, 25.0, kGaiaLimits, 0.01, settings);
    // The maximum over the complete main-sequence bins (the "complete range"): beyond it the
    // 1/Vmax weights of the few catalogued T dwarfs near the survey limit are large and noisy.
    const auto peak = std::max_element(table.begin(), table.end(), [](const LfBin& a, const LfBin& b) {
        const bool a_used = a.population == LfPopulation::MainSequence && a.complete;
        const bool b_used = b.population == LfPopulation::MainSequence && b.complete;
        return a_used != b_used ? b_used : a.phi_per_pc3_per_mag < b.phi_per_pc3_per_mag;
    });
    REQUIRE(peak != table.end());
    MESSAGE("LF maximum in M_G [" << peak->abs_g_lo_mag << ", " << peak->abs_g_hi_mag
                                  << "): " << peak->phi_per_pc3_per_mag << " pc^-3 mag^-1");
    CHECK(peak->population == LfPopulation::MainSequence);
    CHECK(peak->abs_g_lo_mag >= 10.0);
    CHECK(peak->abs_g_hi_mag <= 12.0);
    CHECK(peak->complete);
    // The Gehrels interval brackets the estimate.
    CHECK(peak->phi_lo68 < peak->phi_per_pc3_per_mag);
    CHECK(peak->phi_hi68 > peak->phi_per_pc3_per_mag);
}
