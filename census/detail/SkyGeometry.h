#pragma once
// Unit vectors, small angles and the HEALPix neighbour grid shared by the neighbour searches of the
// catalogue merge (CatalogMerge.cpp) and the system finder (Systems.cpp). Include only from .cpp files
// of census/ (the HEALPix headers are private to the census target).
#include <healpix_cxx/healpix_base.h>
#include <healpix_cxx/pointing.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <numbers>

namespace starcensus::census::detail {

inline constexpr double kRadiansPerDegree = std::numbers::pi / 180.0;
inline constexpr double kRadiansPerMas = kRadiansPerDegree / 3.6e6;
inline constexpr double kArcsecPerRadian = 180.0 / std::numbers::pi * 3600.0;

struct UnitVector {
    double x = 0.0, y = 0.0, z = 0.0;
};

inline UnitVector unitVectorOf(double ra_deg, double dec_deg) {
    const double ra = ra_deg * kRadiansPerDegree;
    const double dec = dec_deg * kRadiansPerDegree;
    return {std::cos(dec) * std::cos(ra), std::cos(dec) * std::sin(ra), std::sin(dec)};
}

/// Squared chord |a - b|^2 between two unit vectors.
inline double chordSquared(const UnitVector& a, const UnitVector& b) {
    return (a.x - b.x) * (a.x - b.x) + (a.y - b.y) * (a.y - b.y) + (a.z - b.z) * (a.z - b.z);
}

/// Angle between two unit vectors (radians), from the chord: accurate at arcsecond separations, where
/// acos of the dot product loses half its digits.
inline double separationRadians(const UnitVector& a, const UnitVector& b) {
    return 2.0 * std::asin(std::min(1.0, std::sqrt(chordSquared(a, b)) / 2.0));
}

/// HEALPix RING order whose pixels are about the search radius across, so a disc query returns a few
/// pixels (Gorski et al. 2005, ApJ 622, 759: pixel size ~ 58.6 deg / nside; from memory).
inline T_Healpix_Base<std::int64_t> neighbourGrid(double radius_rad) {
    int order = T_Healpix_Base<std::int64_t>::order_max;
    while (order > 0 && T_Healpix_Base<std::int64_t>(order, RING).max_pixrad() < radius_rad) {
        --order;
    }
    return T_Healpix_Base<std::int64_t>(order, RING);
}

inline pointing toPointing(const UnitVector& u) {
    return pointing(vec3(u.x, u.y, u.z));
}

} // namespace starcensus::census::detail
