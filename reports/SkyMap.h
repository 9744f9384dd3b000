#pragma once
// Numerics of the report's all-sky map: ICRS -> Galactic coordinates, the Hammer-Aitoff equal-area
// projection, counts per HEALPix pixel (Gorski et al. 2005, ApJ 622, 759; Debian's healpix_cxx) and a
// test of uniformity that flags holes. Nothing here draws or touches files.
#include <array>
#include <cstdint>
#include <span>
#include <vector>

namespace starcensus::reports {

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

struct ProjectedPoint {
    double x = 0.0; // in [-2 sqrt 2, 2 sqrt 2]; longitude increases to the left (x falls with l)
    double y = 0.0; // in [-sqrt 2, sqrt 2]
};

/// Hammer-Aitoff equal-area projection centred on l = 0 (Calabretta & Greisen 2002, A&A 395, 1077,
/// Sect. 5.3.4, "AIT"; section from memory), with the astronomical orientation (increasing l to the
/// left). Longitudes in [-180, 180] are used as given (so +180 is the left edge, -180 the right), others
/// are wrapped into that range. The whole sphere maps onto an ellipse of area 4 pi.
ProjectedPoint hammerAitoff(double l_deg, double b_deg);

/// Object counts per HEALPix pixel (RING ordering) of Galactic positions (theta = 90 deg - b, phi = l).
struct PixelCounts {
    int nside = 1;
    std::vector<std::int64_t> counts; // 12 nside^2 entries
};

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

/// The outline of one pixel in the projected plane, as one polygon, or two where the pixel straddles
/// the l = 180 deg edge of the map (cut there). Edges are sampled at `points_per_edge` points.
std::vector<std::vector<ProjectedPoint>> projectedPixelOutline(int nside, int pixel, int points_per_edge);

/// Centre of a pixel in Galactic coordinates.
GalacticPosition pixelCentre(int nside, int pixel);

} // namespace starcensus::reports
