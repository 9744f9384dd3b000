#pragma once
// The mean main-sequence (dwarf) locus of Pecaut & Mamajek (2013, ApJS 208, 9, Table 5; table version
// 2024.05.15 shipped in data/dwarf_locus_pecaut_mamajek.txt), indexed by the numeric spectral code of
// photometry/StellarClass.h. Gaia colours in the table are on the DR2 system (within ~0.02 mag of DR3).
#include "photometry/Curve.h"

#include <array>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

namespace starcensus::photometry {

/// One row of the locus. Missing quantities are NaN.
struct LocusPoint {
    std::string spectral_type; // e.g. "G2V"
    double spectral_code;      // see StellarClass.h
    double teff_k;
    double abs_g_mag;  // M_G
    double bp_rp_mag;  // G_BP - G_RP
    double g_rp_mag;   // G - G_RP
    double abs_j_mag;  // M_J (2MASS; MKO for Y dwarfs)
    double abs_ks_mag; // M_Ks (2MASS; MKO K for Y dwarfs)
    double mass_msun;
    double abs_v_mag = std::numeric_limits<double>::quiet_NaN();  // M_V (Johnson)
    double log_l_lsun = std::numeric_limits<double>::quiet_NaN(); // log10 L/Lsun
    double radius_rsun = std::numeric_limits<double>::quiet_NaN();
    double w1_w2_mag = std::numeric_limits<double>::quiet_NaN(); // WISE W1 - W2
    double b_v_mag = std::numeric_limits<double>::quiet_NaN();   // Johnson B - V
    double j_h_mag = std::numeric_limits<double>::quiet_NaN();   // 2MASS J - H (MKO for Y dwarfs)
    double ks_w1_mag = std::numeric_limits<double>::quiet_NaN(); // 2MASS Ks - WISE W1
};

/// The quantities of a LocusPoint that can be interpolated or inverted. JKsMag is M_J - M_Ks, VKsMag
/// M_V - M_Ks.
enum class LocusQuantity : std::uint8_t {
    TeffK,
    AbsGMag,
    BpRpMag,
    GRpMag,
    AbsJMag,
    AbsKsMag,
    JKsMag,
    MassMsun,
    AbsVMag,
    LogLLsun,
    RadiusRsun,
    W1W2Mag,
    VKsMag, // M_V - M_Ks (Johnson V, 2MASS Ks), computed like JKsMag
    BVMag,
    JHMag,
    KsW1Mag,
};
inline constexpr std::size_t kLocusQuantityCount = 16;

/// The value of one quantity in a point (JKsMag is computed).
double locusValue(const LocusPoint& point, LocusQuantity quantity);

class DwarfLocus {
  public:
    /// Reads the shipped table; throws InputError naming the file on a missing or malformed table.
    static DwarfLocus load(const std::string& path);
    /// The table in data/ (see dataFilePath()), loaded once.
    static const DwarfLocus& shipped();

    /// Points in any order; throws InputError if a spectral code is missing or repeated.
    explicit DwarfLocus(std::vector<LocusPoint> points);

    const std::vector<LocusPoint>& points() const { return points_; }

    /// Linear interpolation of every quantity at a spectral code, skipping rows where that quantity
    /// is missing; NaN outside the tabulated range of that quantity. spectral_type is the label of the
    /// code (spectralTypeLabel).
    LocusPoint atCode(double spectral_code) const;
    /// One quantity of atCode(), without building the whole point.
    double valueAtCode(LocusQuantity quantity, double spectral_code) const;

    /// Inverse of valueAtCode: the spectral code at which the locus takes `value`; NaN outside the
    /// range the inverse covers. Each inverse is built on a monotone sequence: rows are taken in the
    /// quantity's overall direction along the sequence (Teff and mass fall with code; magnitudes and
    /// colours rise) and a row is kept only if it moves past every row kept before it. Where the locus
    /// turns over, the first (earlier-type) branch wins: e.g. BP-RP peaks at 5.10 at M8.5V and falls to
    /// 4.78 at M9V, so M9V-M9.5V are dropped and BP-RP >= 4.86 maps to M8-M8.5; repeated values (M_G
    /// 15.20 at M7.5V and M8V) keep the earlier type. Use a magnitude (M_G, M_Ks) where a colour
    /// saturates.
    double codeAtValue(LocusQuantity quantity, double value) const;
    double codeFromBpRp(double bp_rp_mag) const { return codeAtValue(LocusQuantity::BpRpMag, bp_rp_mag); }
    double codeFromAbsG(double abs_g_mag) const { return codeAtValue(LocusQuantity::AbsGMag, abs_g_mag); }
    double codeFromMass(double mass_msun) const { return codeAtValue(LocusQuantity::MassMsun, mass_msun); }
    double codeFromTeff(double teff_k) const { return codeAtValue(LocusQuantity::TeffK, teff_k); }

    /// The interval of values the inverse of `quantity` covers (NaN, NaN if none).
    std::array<double, 2> invertibleRange(LocusQuantity quantity) const;

  private:
    std::vector<LocusPoint> points_; // sorted by spectral_code
    // Per quantity: value(code), and the monotone inverse code(value) with value multiplied by
    // direction (+1 or -1) so that it increases.
    std::array<detail::Curve, kLocusQuantityCount> by_code_;
    std::array<detail::Curve, kLocusQuantityCount> inverse_;
    std::array<double, kLocusQuantityCount> direction_{};
};

} // namespace starcensus::photometry
