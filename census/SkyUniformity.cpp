#include "census/SkyUniformity.h"

#include <boost/math/special_functions/gamma.hpp>
#include <healpix_cxx/healpix_base.h>
#include <healpix_cxx/pointing.h>

#include <algorithm>
#include <cmath>
#include <numbers>

namespace starcensus::census {

namespace {

constexpr double kDegree = std::numbers::pi / 180.0;

Healpix_Base ringBase(int nside) {
    return Healpix_Base(nside, RING, SET_NSIDE);
}

} // namespace

double wrapDegrees360(double angle_deg) {
    const double wrapped = std::fmod(angle_deg, 360.0);
    return wrapped < 0.0 ? wrapped + 360.0 : wrapped;
}

const std::array<std::array<double, 3>, 3>& icrsToGalacticMatrix() {
    // A_G' of ESA (1997), The Hipparcos and Tycho Catalogues, Vol. 1, Sect. 1.5.3, Eq. 1.5.11 (values
    // from memory; checked against astropy in tests/census/SkyUniformityTest.cpp).
    static const std::array<std::array<double, 3>, 3> matrix = {{
        {-0.0548755604, -0.8734370902, -0.4838350155},
        {+0.4941094279, -0.4448296300, +0.7469822445},
        {-0.8676661490, -0.1980763734, +0.4559837762},
    }};
    return matrix;
}

GalacticPosition galacticFromIcrs(double ra_deg, double dec_deg) {
    const double ra = ra_deg * kDegree;
    const double dec = dec_deg * kDegree;
    const std::array<double, 3> icrs = {std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra),
                                        std::sin(dec)};
    std::array<double, 3> galactic{};
    for (std::size_t i = 0; i < 3; ++i) {
        for (std::size_t j = 0; j < 3; ++j) {
            galactic[i] += icrsToGalacticMatrix()[i][j] * icrs[j];
        }
    }
    const double b = std::atan2(galactic[2], std::hypot(galactic[0], galactic[1]));
    return {wrapDegrees360(std::atan2(galactic[1], galactic[0]) / kDegree), b / kDegree};
}

PixelCounts countPerPixel(std::span<const GalacticPosition> positions, int nside) {
    const Healpix_Base base = ringBase(nside);
    PixelCounts result{nside, std::vector<std::int64_t>(static_cast<std::size_t>(base.Npix()), 0)};
    for (const auto& position : positions) {
        if (!std::isfinite(position.l_deg) || !std::isfinite(position.b_deg)) {
            continue; // a row without RA/Dec (compilations without positions) has no pixel
        }
        const pointing direction((90.0 - position.b_deg) * kDegree, wrapDegrees360(position.l_deg) * kDegree);
        ++result.counts[static_cast<std::size_t>(base.ang2pix(direction))];
    }
    return result;
}

int chooseNside(std::int64_t objects, const UniformitySettings& settings) {
    int nside = 1;
    while (nside * 2 <= settings.max_nside &&
           static_cast<double>(objects) / (12.0 * 4.0 * nside * nside) >= settings.min_mean_per_pixel) {
        nside *= 2;
    }
    return nside;
}

UniformityTest testUniformity(const PixelCounts& counts, double significance) {
    UniformityTest test;
    test.nside = counts.nside;
    test.significance = significance;
    test.pixels = static_cast<std::int64_t>(counts.counts.size());
    for (const auto count : counts.counts) {
        test.objects += count;
    }
    test.mean_per_pixel = static_cast<double>(test.objects) / static_cast<double>(test.pixels);
    test.degrees_of_freedom = test.pixels - 1;
    test.expected_empty_pixels = static_cast<double>(test.pixels) * std::exp(-test.mean_per_pixel);
    test.min_count = *std::min_element(counts.counts.begin(), counts.counts.end());
    for (std::size_t pixel = 0; pixel < counts.counts.size(); ++pixel) {
        if (counts.counts[pixel] == 0) {
            test.empty_pixels.push_back(static_cast<int>(pixel));
        }
    }
    if (test.objects == 0) {
        return test; // nothing to test: no evidence either way
    }
    for (const auto count : counts.counts) {
        const double deviation = static_cast<double>(count) - test.mean_per_pixel;
        test.chi_square += deviation * deviation / test.mean_per_pixel;
    }
    test.chi_square_p_value =
        boost::math::gamma_q(0.5 * static_cast<double>(test.degrees_of_freedom), 0.5 * test.chi_square);
    // Poisson CDF: P(N <= k | mu) = Q(k + 1, mu), the regularised upper incomplete gamma function.
    const double single_pixel =
        boost::math::gamma_q(static_cast<double>(test.min_count) + 1.0, test.mean_per_pixel);
    test.deepest_hole_p_value =
        single_pixel >= 1.0 ? 1.0 : -std::expm1(static_cast<double>(test.pixels) * std::log1p(-single_pixel));
    test.uniformity_rejected =
        std::min(test.chi_square_p_value, test.deepest_hole_p_value) < significance / 2.0;
    return test;
}

GalacticPosition pixelCentre(int nside, int pixel) {
    const pointing centre = ringBase(nside).pix2ang(pixel);
    return {wrapDegrees360(centre.phi / kDegree), 90.0 - centre.theta / kDegree};
}

} // namespace starcensus::census
