#include "census/mock/Neighbourhood.h"

#include "census/mock/MeasurementErrors.h"
#include "photometry/WhiteDwarfSequence.h"
#include "photometry/base/InputError.h"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <unordered_map>

using namespace starcensus::census;
using namespace starcensus::census::mock;
using starcensus::photometry::StellarClass;

namespace {

double sphereVolume(double radius_pc) {
    return 4.0 / 3.0 * std::numbers::pi * std::pow(radius_pc, 3);
}

const MockResult& standardMock() { // defaults: 25 pc, 0.1 systems pc^-3, Kroupa
    static const MockResult result = simulateNeighbourhood(MockSettings{}, 20240601);
    return result;
}

const MockResult& largeMock() { // 60 pc: enough giants and white dwarfs for their checks
    static const MockResult result = [] {
        MockSettings settings;
        settings.radius_max_pc = 60.0;
        return simulateNeighbourhood(settings, 77);
    }();
    return result;
}

// Kolmogorov-Smirnov statistic of values that should be uniform on [0, 1].
double ksStatisticUniform(std::vector<double> values) {
    std::sort(values.begin(), values.end());
    const double n = static_cast<double>(values.size());
    double d = 0.0;
    for (std::size_t i = 0; i < values.size(); ++i) {
        d = std::max({d, (i + 1) / n - values[i], values[i] - i / n});
    }
    return d;
}

// Kolmogorov distribution: the 1% critical value of sqrt(N) D is 1.63 (standard table, e.g. Press et
// al., Numerical Recipes, section 14.3; from memory).
constexpr double kKsCritical1Percent = 1.63;

bool isStar(const ObjectTruth& t) {
    return t.stage != MockStage::BrownDwarf;
}

} // namespace

TEST_CASE("counts within radii follow the density within Poisson errors") {
    MockSettings settings;
    settings.radius_max_pc = 15.0;
    settings.imf.mass_max_msun = 8.0; // no NS/BH, so every system is an object
    const std::vector<double> radii = {5.0, 10.0, 15.0};
    double chi_square = 0.0;
    constexpr int seeds = 20;
    for (int seed = 1; seed <= seeds; ++seed) {
        const MockResult result = simulateNeighbourhood(settings, static_cast<std::uint64_t>(seed));
        CHECK(result.remnant_only_systems == 0);
        const auto counts = countWithinRadii(result.truth, radii);
        for (const RadiusCounts& within : counts) {
            std::int64_t n = 0;
            for (auto c : within.all) {
                n += c;
            }
            const double lambda = settings.system_density_per_pc3 * sphereVolume(within.radius_pc);
            CAPTURE(seed);
            CAPTURE(within.radius_pc);
            CHECK(std::abs(static_cast<double>(n) - lambda) < 4.0 * std::sqrt(lambda));
            if (within.radius_pc == 15.0) {
                chi_square += std::pow(static_cast<double>(n) - lambda, 2) / lambda;
            }
        }
    }
    // Sum of 20 squared Poisson pulls ~ chi-square with 20 degrees of freedom: 45.3 is its 0.1% point
    // (standard chi-square table; from memory).
    CHECK(chi_square < 45.3);
    CHECK(chi_square > 5.9); // its 0.1% lower point: the counts are not suspiciously regular either
}

TEST_CASE("positions are uniform in the sphere: N(<r) ∝ r^3, uniform on the sky (KS test)") {
    const auto& result = standardMock();
    const double radius = result.settings.radius_max_pc;
    std::vector<double> volume_fraction, ra_fraction, sin_dec_fraction;
    for (const ObjectTruth& t : result.truth) {
        volume_fraction.push_back(std::pow(t.distance_pc / radius, 3));
    }
    for (const auto& row : result.catalog) {
        ra_fraction.push_back(row.ra_deg / 360.0);
        sin_dec_fraction.push_back(0.5 * (std::sin(row.dec_deg * std::numbers::pi / 180.0) + 1.0));
    }
    const double n = static_cast<double>(volume_fraction.size());
    const double m = static_cast<double>(ra_fraction.size());
    CHECK(std::sqrt(n) * ksStatisticUniform(volume_fraction) < kKsCritical1Percent);
    CHECK(std::sqrt(m) * ksStatisticUniform(ra_fraction) < kKsCritical1Percent);
    CHECK(std::sqrt(m) * ksStatisticUniform(sin_dec_fraction) < kKsCritical1Percent);
    CHECK(std::is_sorted(
        result.truth.begin(), result.truth.end(),
        [](const ObjectTruth& a, const ObjectTruth& b) { return a.distance_pc < b.distance_pc; }));
}

TEST_CASE("survey limit, BP/RP loss and the parallax error law in the catalog") {
    const auto& result = standardMock();
    const double g_limit = result.settings.g_limit_mag;
    std::size_t faint = 0, lost_faint = 0, n = 0, row = 0;
    double pull_sum = 0.0, pull_square_sum = 0.0;
    for (const ObjectTruth& t : result.truth) {
        // Objects well between the limits are all catalogued (G errors are millimagnitudes there), and
        // none brighter than the bright (saturation) limit is.
        if (t.true_g_mag < g_limit - 0.1 && t.true_g_mag > result.settings.g_bright_limit_mag + 0.1) {
            CHECK(t.catalogued);
        }
        if (t.true_g_mag < result.settings.g_bright_limit_mag - 0.1) {
            CHECK_FALSE(t.catalogued);
        }
        if (!t.catalogued) {
            continue;
        }
        const auto& catalogued = result.catalog[row++];
        REQUIRE(catalogued.source_id == t.source_id);
        REQUIRE(catalogued.g_mag <= g_limit);
        // The reported error is the law at the reported G, at every magnitude: to 1e-6 relative, as the row
        // holds G as a float (CatalogRow.h) and the law was evaluated at the G before rounding.
        CHECK(catalogued.parallax_error_mas ==
              doctest::Approx(parallaxErrorMas(catalogued.g_mag)).epsilon(1e-6));
        const double pull =
            (catalogued.parallax_mas - 1000.0 / t.distance_pc) / catalogued.parallax_error_mas;
        pull_sum += pull;
        pull_square_sum += pull * pull;
        ++n;
        // Brighter than G = 19 the colours are lost only where the locus has no BP-RP (after M9.5V).
        if (catalogued.g_mag < 19.0 && !(t.spectral_code > 69.5)) {
            CHECK(std::isfinite(catalogued.bp_mag + catalogued.rp_mag));
        }
        if (catalogued.g_mag > 20.5) { // loss probability >= 0.75 here
            ++faint;
            lost_faint += std::isnan(catalogued.bp_mag) ? 1 : 0;
        }
    }
    CHECK(row == result.catalog.size());
    // Parallax pulls ~ N(0, 1): mean within 4/sqrt(n), variance within 4 sqrt(2/n) of 1.
    const double mean = pull_sum / n;
    CHECK(std::abs(mean) < 4.0 / std::sqrt(n));
    CHECK(std::abs(pull_square_sum / n - mean * mean - 1.0) < 4.0 * std::sqrt(2.0 / n));
    REQUIRE(faint > 20);
    CHECK(lost_faint >= 0.6 * faint);
}

TEST_CASE("binary fraction, class mix and white-dwarf share of a default mock") {
    const auto& result = standardMock();
    const auto& truth = result.truth;
    std::size_t binaries = 0, stars = 0, m_dwarfs = 0, white_dwarfs = 0;
    for (const ObjectTruth& t : truth) {
        binaries += t.binary ? 1 : 0;
        if (isStar(t)) {
            ++stars;
            m_dwarfs += t.true_class == StellarClass::M ? 1 : 0;
            white_dwarfs += t.true_class == StellarClass::WhiteDwarf ? 1 : 0;
        }
    }
    // Binary fraction recovered within a binomial 4 sigma (companions that are NS/BH are removed,
    // a negligible loss).
    const double f = result.settings.binary_fraction;
    const double n = static_cast<double>(truth.size());
    CHECK(std::abs(binaries / n - f) < 4.0 * std::sqrt(f * (1 - f) / n));
    // M dwarfs are about three quarters of the stars (RECONS 10 pc census: 73-75%, published-figures.md
    // section 1; Mamajek figshare densities give 72%, section 4). Loose: 0.65-0.85.
    CHECK(m_dwarfs / static_cast<double>(stars) > 0.65);
    CHECK(m_dwarfs / static_cast<double>(stars) < 0.85);
    // White dwarfs: Mamajek figshare WD density 4.8e-3 of 0.0824 stars pc^-3, ~5.8% (published-figures.md
    // section 4). Loose: within a factor 2.
    CHECK(white_dwarfs / static_cast<double>(stars) > 0.058 / 2);
    CHECK(white_dwarfs / static_cast<double>(stars) < 0.058 * 2);
    // About 400 objects (stars and brown dwarfs, companions included) within 9.2 pc = 30 light years at
    // 0.1 systems pc^-3 (rule of thumb, common practice, no source). Loose: 300-520.
    const std::vector<double> radius = {9.2};
    const auto counts = countWithinRadii(truth, radius);
    std::int64_t components = 0;
    for (auto c : counts[0].components) {
        components += c;
    }
    CHECK(components > 300);
    CHECK(components < 520);
}

TEST_CASE("giants sit on the red clump; white dwarfs and the main-sequence LF where observed") {
    const auto& result = largeMock();
    double giant_sum = 0.0;
    int giants = 0, white_dwarfs = 0, white_dwarfs_in_range = 0;
    std::array<int, 30> main_sequence_histogram{};
    for (const ObjectTruth& t : result.truth) {
        if (t.stage == MockStage::Giant && !t.binary) {
            giant_sum += t.abs_g_mag;
            ++giants;
        }
        if (t.stage == MockStage::WhiteDwarf && !t.binary) {
            ++white_dwarfs;
            // 10 pc white dwarfs: M_G 11.0-15.8 (published-figures.md section 3, computed from Reylé et
            // al. 2021); the mock's range is checked loosely as 10-16.5.
            white_dwarfs_in_range += (t.abs_g_mag > 10.0 && t.abs_g_mag < 16.5) ? 1 : 0;
        }
        if (t.stage == MockStage::MainSequence && !t.binary && t.abs_g_mag >= 0.0 && t.abs_g_mag < 30.0) {
            ++main_sequence_histogram[static_cast<std::size_t>(t.abs_g_mag)];
        }
    }
    // Ruiz-Dern et al. 2018 (A&A 609, A116): clump M_G = 0.495 at G-Ks = 2.1; the mock's mean within
    // 4 standard errors (scatter ~0.35 mag).
    REQUIRE(giants > 100);
    CHECK(std::abs(giant_sum / giants - 0.495) < 4.0 * 0.35 / std::sqrt(giants));
    REQUIRE(white_dwarfs > 500);
    CHECK(white_dwarfs_in_range > 0.95 * white_dwarfs);
    // The main-sequence luminosity function peaks at M_G 9-12 (raw 10 pc count, published-figures.md
    // section 5; GCNS from memory): the mode of the 1-mag histogram lies in [9, 13).
    const auto mode = std::max_element(main_sequence_histogram.begin(), main_sequence_histogram.end()) -
                      main_sequence_histogram.begin();
    CHECK(mode >= 9);
    CHECK(mode < 13);
}

TEST_CASE("deterministic per seed, independent of chunk size, nested in radius") {
    const auto& reference = standardMock();
    const MockResult again = simulateNeighbourhood(MockSettings{}, 20240601);
    REQUIRE(again.catalog.size() == reference.catalog.size());
    for (std::size_t i = 0; i < again.catalog.size(); ++i) {
        REQUIRE(again.catalog[i].source_id == reference.catalog[i].source_id);
        REQUIRE(again.catalog[i].g_mag == reference.catalog[i].g_mag);
        REQUIRE(again.catalog[i].parallax_mas == reference.catalog[i].parallax_mas);
    }
    const MockResult other = simulateNeighbourhood(MockSettings{}, 20240602);
    CHECK(other.catalog.front().source_id != reference.catalog.front().source_id);

    // Small chunks give the same objects.
    const starcensus::photometry::ShippedModelPhotometry models;
    MockGenerator generator(MockSettings{}, 20240601, models);
    std::vector<starcensus::photometry::CatalogRow> catalog;
    std::vector<ObjectTruth> truth;
    while (generator.next(7, catalog, truth)) {
    }
    REQUIRE(truth.size() == reference.truth.size());
    CHECK(truth.back().source_id == reference.truth.back().source_id);
    CHECK(catalog.back().ks_mag == reference.catalog.back().ks_mag);

    // A 10 pc mock is the inner part of the 25 pc mock with the same seed.
    MockSettings inner_settings;
    inner_settings.radius_max_pc = 10.0;
    const MockResult inner = simulateNeighbourhood(inner_settings, 20240601);
    REQUIRE(!inner.truth.empty());
    for (std::size_t i = 0; i < inner.truth.size(); ++i) {
        REQUIRE(inner.truth[i].source_id == reference.truth[i].source_id);
        REQUIRE(inner.truth[i].mass_msun == reference.truth[i].mass_msun);
    }
    CHECK(reference.truth[inner.truth.size()].distance_pc > 10.0);

    // Source ids are unique and positive.
    std::vector<std::int64_t> ids;
    for (const ObjectTruth& t : reference.truth) {
        ids.push_back(t.source_id);
    }
    std::sort(ids.begin(), ids.end());
    CHECK(std::adjacent_find(ids.begin(), ids.end()) == ids.end());
    CHECK(ids.front() > 0);
}

TEST_CASE("white-dwarf log g of the Nauenberg relation against the Montreal grid") {
    // Nauenberg 1972 against the Montreal DA grid (shipped models): the coolest models at log g 7, 8,
    // 9 have masses whose zero-temperature log g lies within 0.06 dex of the grid value.
    const auto& models = starcensus::photometry::WhiteDwarfSequence::shipped().models(
        starcensus::photometry::WhiteDwarfAtmosphere::Hydrogen);
    int checked = 0;
    for (const auto& model : models) {
        if (model.teff_k == 5000.0) {
            CAPTURE(model.log_g);
            CHECK(whiteDwarfLogG(model.mass_msun) ==
                  doctest::Approx(model.log_g).epsilon(0.06 / model.log_g));
            ++checked;
        }
    }
    CHECK(checked == 5);
}

TEST_CASE("bad mock settings are rejected naming the option, value and range") {
    MockSettings bad;
    bad.system_density_per_pc3 = -1.0;
    CHECK_THROWS_WITH_AS(validateMockSettings(bad),
                         "--density: -1 is outside the allowed range (0, 100] per pc^3",
                         starcensus::InputError);
    bad = {};
    bad.binary_fraction = 1.5;
    CHECK_THROWS_WITH_AS(validateMockSettings(bad),
                         "--binary-fraction: 1.5 is outside the allowed range [0, 1]",
                         starcensus::InputError);
    bad = {};
    bad.bp_rp_loss_start_g_mag = 21.5;
    CHECK_THROWS_AS(simulateNeighbourhood(bad, 1), starcensus::InputError);
    bad = {};
    bad.companion.w2_limit_mag = 40.0;
    CHECK_THROWS_WITH_AS(validateMockSettings(bad), "--w2-limit: 40 is outside the allowed range [0, 30] mag",
                         starcensus::InputError);
    bad = {};
    bad.g_bright_limit_mag = 21.0;
    CHECK_THROWS_WITH_AS(validateMockSettings(bad), "--g-bright-limit: must be below --g-limit",
                         starcensus::InputError);
}

TEST_CASE("resolved companions: separations follow the Raghavan et al. 2010 period distribution") {
    // Raghavan et al. 2010 (ApJS 190, 1, Sect. 7.1; from memory): log10 P/day ~ N(5.03, 2.28). Through
    // Kepler's third law log10 a/au = (2/3)(log10 P/day - log10 365.25) + (1/3) log10 M/Msun, and for an
    // isotropic orientation at a random phase of a circular orbit the projected separation is a sin i with
    // E[log10 sin i] = (ln 2 - 1) / ln 10 = -0.1333 (exact integral over cos i uniform). Every system draws
    // one companion and nothing is hidden by the resolution limit, so the mean of log10 s - (1/3) log10 M
    // over the companions is (2/3)(5.03 - 2.5626) - 0.1333 = 1.5115, less what the redraw of orbits wider
    // than 1 pc (log10 a = 5.31, z ~ 2.48 for M ~ 0.5 Msun) trims from the top of N(1.645, 1.52):
    // sigma phi(z) / Phi(z) = 1.52 x 0.0184 / 0.993 = 0.028, so 1.483; standard error (2/3) 2.28 / sqrt(n).
    MockSettings settings;
    settings.radius_max_pc = 30.0;
    settings.wide_companion_fraction = 1.0;
    settings.wide_triple_share = 0.0;
    settings.resolution_limit_arcsec = 0.0;
    const MockResult result = simulateNeighbourhood(settings, 99);
    std::unordered_map<std::int64_t, const ObjectTruth*> first;
    for (const ObjectTruth& t : result.truth) {
        if (!t.resolved_companion) {
            first[t.source_id] = &t;
        }
    }
    double sum = 0.0;
    std::size_t companions = 0;
    for (const ObjectTruth& t : result.truth) {
        if (t.resolved_companion) {
            const ObjectTruth& primary = *first.at(t.system_source_id);
            CHECK(std::abs(t.distance_pc - primary.distance_pc) < 1.0); // within 1 pc in space
            sum += std::log10(t.separation_au) - std::log10(primary.mass_msun + t.mass_msun) / 3.0;
            ++companions;
        }
    }
    REQUIRE(companions > 1000);
    // Most systems get one; the rest drew a compact remnant as companion, or none survived the redraws.
    CHECK(static_cast<double>(companions) > 0.9 * static_cast<double>(first.size()));
    const double mean = sum / static_cast<double>(companions);
    const double standard_error = 2.0 / 3.0 * 2.28 / std::sqrt(static_cast<double>(companions));
    MESSAGE("companions " << companions << ", mean log10 s - log10(M) / 3 = " << mean << " +- "
                          << standard_error);
    CHECK(std::abs(mean - 1.483) < 4.0 * standard_error + 0.01);
}

TEST_CASE("companion catalogue: what the Gaia-like survey misses, the overlap, and an unchanged Gaia file") {
    MockSettings settings;
    settings.companion.enabled = true;
    const MockResult& without = standardMock();
    const MockResult with = simulateNeighbourhood(settings, 20240601);
    // The Gaia-like catalogue is the same object for object: the companion draws from its own streams.
    REQUIRE(with.catalog.size() == without.catalog.size());
    for (std::size_t i = 0; i < with.catalog.size(); ++i) {
        REQUIRE(with.catalog[i].source_id == without.catalog[i].source_id);
        REQUIRE(with.catalog[i].g_mag == without.catalog[i].g_mag);
        REQUIRE(with.catalog[i].parallax_mas == without.catalog[i].parallax_mas);
    }
    CHECK(without.companion_catalog.empty());
    REQUIRE(!with.companion_catalog.empty());
    const CompanionSettings& c = settings.companion;
    std::int64_t ultracool = 0, both = 0, bright = 0, typed = 0, t_dwarfs = 0, y_dwarfs = 0;
    double pull_sum = 0.0, pull_square_sum = 0.0;
    for (const ObjectTruth& t : with.truth) {
        if (t.true_g_mag < settings.g_bright_limit_mag) {
            CHECK(t.in_companion); // every saturated star is in the companion, none in the Gaia file
            CHECK_FALSE(t.catalogued);
        }
        if (!t.in_companion) {
            continue;
        }
        const CompanionRow& row = with.companion_catalog[static_cast<std::size_t>(t.companion_row)];
        CHECK(row.row.source_id == starcensus::photometry::kMissingSourceId);
        if (t.true_g_mag < settings.g_bright_limit_mag) {
            ++bright;
            CHECK(std::isfinite(row.row.v_mag));
            CHECK(row.row.parallax_error_mas == doctest::Approx(c.hipparcos_parallax_error_mas));
        } else {
            ++ultracool;
            CHECK(t.spectral_code >= c.ultracool_min_code);
            CHECK(row.row.w2_mag <= c.w2_limit_mag);
            both += t.catalogued ? 1 : 0;
            t_dwarfs += t.true_class == StellarClass::T ? 1 : 0;
            y_dwarfs += t.true_class == StellarClass::Y ? 1 : 0;
            if (!row.spectral_type.empty()) {
                // Typed to the half subtype below the truth: the letter is the true class's.
                CHECK(row.spectral_type.front() == starcensus::photometry::className(t.true_class).front());
            }
        }
        typed += row.spectral_type.empty() ? 0 : 1;
        const double pull = (row.row.parallax_mas - 1000.0 / t.distance_pc) / row.row.parallax_error_mas;
        pull_sum += pull;
        pull_square_sum += pull * pull;
    }
    const auto n = static_cast<double>(with.companion_catalog.size());
    CHECK(static_cast<double>(ultracool + bright) == n);
    MESSAGE("companion: " << ultracool << " ultracool (" << both << " also in the Gaia file; T " << t_dwarfs
                          << ", Y " << y_dwarfs << "), " << bright << " bright, " << typed << " typed");
    CHECK(both > 0);
    CHECK(both < ultracool);
    CHECK(y_dwarfs > 0);
    CHECK(bright > 0);
    // Spectral types for the share asked: binomial, within 4 standard errors.
    CHECK(std::abs(static_cast<double>(typed) / n - c.spectral_type_share) <
          4.0 * std::sqrt(c.spectral_type_share * (1.0 - c.spectral_type_share) / n));
    // Parallax pulls are standard normal: mean within 4 standard errors, variance within 15%.
    const double mean_pull = pull_sum / n;
    CHECK(std::abs(mean_pull) < 4.0 / std::sqrt(n));
    CHECK(pull_square_sum / n - mean_pull * mean_pull == doctest::Approx(1.0).epsilon(0.15));
}
