#pragma once
// The mean main-sequence (dwarf) locus of Pecaut & Mamajek (2013, ApJS 208, 9, Table 5; table version
// 2024.05.15 shipped in data/dwarf_locus_pecaut_mamajek.txt), indexed by the numeric spectral code of
// photometry/StellarClass.h. Gaia colours in the table are on the DR2 system (within ~0.02 mag of DR3).
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
    double abs_j_mag;  // M_J (2MASS)
    double abs_ks_mag; // M_Ks (2MASS)
    double mass_msun;
};

class DwarfLocus {
  public:
    /// Reads the shipped table; throws InputError naming the file on a missing or malformed table.
    static DwarfLocus load(const std::string& path);
    /// The table in data/ (see data::path()).
    static const DwarfLocus& shipped();

    explicit DwarfLocus(std::vector<LocusPoint> points);

    const std::vector<LocusPoint>& points() const { return points_; }

    /// Linear interpolation of every quantity at a spectral code, skipping rows where that quantity
    /// is missing; NaN outside the tabulated range of that quantity.
    LocusPoint atCode(double spectral_code) const;

  private:
    std::vector<LocusPoint> points_; // sorted by spectral_code
};

} // namespace starcensus::photometry
