#pragma once
// Where the members lie on the sky and whether they cover it evenly: ICRS -> Galactic coordinates,
// counts per HEALPix pixel (Gorski et al. 2005, ApJ 622, 759; Debian's healpix_cxx) and a test of
// uniformity that flags holes (a sky-completeness check of the census sample).
#include <array>
#include <cstdint>
#include <span>
#include <vector>

namespace starcensus::census {

struct GalacticPosition {
    double l_deg = 0.0; // Galactic longitude, [0, 360)
    double b_deg = 0.0; // Galactic latitude, [-90, 90]
};

/// ICRS (ra, dec in degrees) to Galactic (l, b in degrees) through the rotation matrix A_G of the
/// Hipparcos catalogue (ESA 1997, Vol. 1, Sect. 1.5.3, Eq. 1.5.11), which treats ICRS as FK5 J2000;
/// the frame bias it ignores is ~20 mas (Liu et al. 2011, A&A 526, A16).
GalacticPosition galacticFromIcrs(double ra_deg, double dec_deg);

/// The rows of A_G' (Galactic unit vector = matrix * ICRS unit vector).
const std::array<std::array<double, 3>, 3>& icrsToGalacticMatrix();

/// Angle in [0, 360) degrees.
double wrapDegrees360(double angle_deg);

/// Object counts per HEALPix pixel (RING ordering) of Galactic positions (theta = 90 deg - b, phi = l).
struct PixelCounts {
    int nside = 1;
    std::vector<std::int64_t> counts; // 12 nside^2 entries
};

/// Objects per RING pixel; positions with a NaN coordinate (rows without RA/Dec) are left out.
PixelCounts countPerPixel(std::span<const GalacticPosition> positions, int nside);

struct UniformitySettings {
    // The map resolution is the largest nside (a power of two up to max_nside) at which the mean count
    // per pixel is at least min_mean_per_pixel, so the chi-square approximation holds (common practice,
    // no source: expected counts >= 5-10 per cell).
    double min_mean_per_pixel = 10.0;
    int max_nside = 16;
    // Family-wise significance of the two tests below together (Bonferroni: each at half of it).
    double significance = 0.01;
};

/// Choice of nside for n objects under the settings (1 if even nside 1 has a mean below the minimum).
int chooseNside(std::int64_t objects, const UniformitySettings& settings);

/// Two tests of the null hypothesis that the objects are uniform on the sky (Poisson counts of equal
/// mean in equal-area pixels):
/// - dispersion: chi^2 = sum (n_i - mean)^2 / mean with npix - 1 degrees of freedom, upper-tail p
///   (the Poisson index-of-dispersion test; holes and clusters both raise it);
/// - deepest hole: P(N <= min n_i) for Poisson(mean), corrected for looking at npix pixels (Sidak:
///   1 - (1 - p)^npix).
struct UniformityTest {
    int nside = 1;
    std::int64_t pixels = 0;
    std::int64_t objects = 0;
    double mean_per_pixel = 0.0;
    double chi_square = 0.0;
    std::int64_t degrees_of_freedom = 0;
    double chi_square_p_value = 1.0;
    std::int64_t min_count = 0;
    double deepest_hole_p_value = 1.0;
    std::vector<int> empty_pixels;      // RING indices
    double expected_empty_pixels = 0.0; // npix exp(-mean)
    double significance = 0.01;
    bool uniformity_rejected = false; // either p below significance / 2
};

UniformityTest testUniformity(const PixelCounts& counts, double significance);

/// Centre of a pixel in Galactic coordinates.
GalacticPosition pixelCentre(int nside, int pixel);

} // namespace starcensus::census
