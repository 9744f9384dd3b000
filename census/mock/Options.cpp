#include "census/mock/Options.h"

#include "photometry/base/InputError.h"

#include <boost/program_options/value_semantic.hpp>

#include <sstream>

namespace po = boost::program_options;

namespace starcensus::census {

void validate(boost::any& value, const std::vector<std::string>& tokens, ImfFamily*, int) {
    const std::string& token = po::validators::get_single_string(tokens);
    for (const ImfFamily family : {ImfFamily::Kroupa2001, ImfFamily::Chabrier2003}) {
        if (token == imfFamilyName(family)) {
            value = family;
            return;
        }
    }
    throw InputError("--imf: '" + token + "' is not one of kroupa, chabrier");
}

} // namespace starcensus::census

namespace starcensus::census::mock {

po::options_description mockOptionsDescription(MockRequest& request) {
    MockSettings& s = request.settings;
    ImfSettings& imf = s.imf;
    po::options_description options("Mock neighbourhood (simulated catalog with known truth)");
    // Defaults shown with 6 significant digits ("0.1", not the 17 digits of lexical_cast).
    const auto real = [](double& field, const char* value_name) {
        std::ostringstream shown;
        shown << field;
        return po::value<double>(&field)->default_value(field, shown.str())->value_name(value_name);
    };
    // clang-format off
    options.add_options()
        ("seed", po::value<std::uint64_t>(&request.seed)->default_value(request.seed)->value_name("N"),
         "random seed; the same seed and settings give the same mock")
        ("radius-max", real(s.radius_max_pc, "PC"), "radius of the simulated sphere around the Sun (pc)")
        ("density", real(s.system_density_per_pc3, "PER_PC3"),
         "space density of stellar systems (per pc^3; common practice, no source)")
        ("velocity-dispersion", real(s.velocity_dispersion_km_s, "KM_S"),
         "1-sigma tangential velocity per axis (km/s; common practice, no source)")
        ("imf", po::value<ImfFamily>(&imf.family)->default_value(imf.family, imfFamilyName(imf.family))->value_name("kroupa|chabrier"),
         "initial mass function: kroupa (Kroupa 2001, MNRAS 322, 231) or chabrier (Chabrier 2003, PASP "
         "115, 763, single objects)")
        ("imf-mass-min", real(imf.mass_min_msun, "MSUN"), "lowest simulated mass (Msun)")
        ("imf-mass-max", real(imf.mass_max_msun, "MSUN"), "highest simulated mass (Msun)")
        ("imf-alpha-low", real(imf.kroupa_alpha_low, "SLOPE"), "kroupa: slope of dN/dm below --imf-break-low")
        ("imf-alpha-mid", real(imf.kroupa_alpha_mid, "SLOPE"), "kroupa: slope between the breaks")
        ("imf-alpha-high", real(imf.kroupa_alpha_high, "SLOPE"), "kroupa: slope above --imf-break-high")
        ("imf-break-low", real(imf.kroupa_break_low_msun, "MSUN"), "kroupa: lower break mass (Msun)")
        ("imf-break-high", real(imf.kroupa_break_high_msun, "MSUN"), "kroupa: upper break mass (Msun)")
        ("imf-peak-mass", real(imf.chabrier_peak_mass_msun, "MSUN"), "chabrier: log-normal characteristic mass (Msun)")
        ("imf-sigma", real(imf.chabrier_sigma_dex, "DEX"), "chabrier: log-normal width (dex)")
        ("imf-join", real(imf.chabrier_join_msun, "MSUN"), "chabrier: mass where the power law takes over (Msun)")
        ("imf-x-high", real(imf.chabrier_x_high, "SLOPE"), "chabrier: slope x of dN/dlog m = c m^-x above the join")
        ("disc-age", real(s.disc_age_gyr, "GYR"),
         "constant star formation over this time (Gyr; common practice, no source)")
        ("ms-lifetime-sun", real(s.ms_lifetime_sun_gyr, "GYR"), "main-sequence lifetime of 1 Msun (Gyr)")
        ("ms-lifetime-exponent", real(s.ms_lifetime_exponent, "SLOPE"), "t_MS = t_sun (M/Msun)^exponent")
        ("giant-share", real(s.giant_phase_share, "FRACTION"), "giant-phase length as a fraction of t_MS")
        ("wd-progenitor-max", real(s.max_white_dwarf_progenitor_msun, "MSUN"),
         "heavier stars end as NS/BH and are removed (Msun)")
        ("hydrogen-burning-limit", real(s.hydrogen_burning_limit_msun, "MSUN"), "brown dwarfs below this mass (Msun)")
        ("bd-teff-min", real(s.brown_dwarf_teff_min_k, "K"), "lowest brown-dwarf Teff (K)")
        ("bd-teff-max", real(s.brown_dwarf_teff_max_k, "K"), "highest brown-dwarf Teff (K)")
        ("ifmr-slope", real(s.ifmr_slope, "SLOPE"), "initial-final mass relation M_f = slope M_i + intercept")
        ("ifmr-intercept", real(s.ifmr_intercept_msun, "MSUN"), "initial-final mass relation intercept (Msun)")
        ("da-share", real(s.hydrogen_atmosphere_share, "FRACTION"), "share of white dwarfs with hydrogen atmospheres")
        ("binary-fraction", real(s.binary_fraction, "FRACTION"), "fraction of systems that are unresolved binaries")
        ("wide-fraction", real(s.wide_companion_fraction, "FRACTION"), "fraction of systems drawing a resolved companion")
        ("wide-triple-share", real(s.wide_triple_share, "FRACTION"), "share of those drawing a second one (triples)")
        ("wide-log-period-mean", real(s.wide_log_period_mean_day, "DEX"), "mean log10 period of resolved companions (days)")
        ("wide-log-period-sigma", real(s.wide_log_period_sigma_dex, "DEX"), "spread of their log10 period (dex)")
        ("resolution-limit", real(s.resolution_limit_arcsec, "ARCSEC"), "companions closer than this are not added (arcsec)")
        ("wide-separation-max", real(s.wide_max_separation_au, "AU"), "widest resolved orbit (au)")
        ("ms-mag-scatter", real(s.ms_abs_mag_scatter_mag, "MAG"), "intrinsic scatter of dwarf magnitudes (mag)")
        ("ms-colour-scatter", real(s.ms_colour_scatter_mag, "MAG"), "intrinsic scatter of dwarf BP-RP and J-Ks (mag)")
        ("giant-mag-scatter", real(s.giant_abs_g_scatter_mag, "MAG"), "scatter of giants around the clump M_G (mag)")
        ("giant-bp-rp", real(s.giant_bp_rp_mag, "MAG"), "mean BP-RP of giants (mag)")
        ("giant-bp-rp-scatter", real(s.giant_bp_rp_scatter_mag, "MAG"), "scatter of giants' BP-RP (mag)")
        ("giant-g-ks", real(s.giant_g_ks_mag, "MAG"), "mean G-Ks of giants (mag)")
        ("giant-g-ks-scatter", real(s.giant_g_ks_scatter_mag, "MAG"), "scatter of giants' G-Ks (mag)")
        ("g-limit", real(s.g_limit_mag, "MAG"), "survey limit: sources with measured G above it are not catalogued (mag)")
        ("g-bright-limit", real(s.g_bright_limit_mag, "MAG"), "saturation: sources with measured G below it are not catalogued (mag)")
        ("bp-rp-loss-start", real(s.bp_rp_loss_start_g_mag, "MAG"), "G where BP/RP start to be lost (mag)")
        ("bp-rp-loss-end", real(s.bp_rp_loss_end_g_mag, "MAG"), "G where BP/RP are always lost (mag)")
        ("j-limit", real(s.j_limit_mag, "MAG"), "2MASS-like J limit (mag)")
        ("h-limit", real(s.h_limit_mag, "MAG"), "2MASS-like H limit (mag)")
        ("ks-limit", real(s.ks_limit_mag, "MAG"), "2MASS-like Ks limit (mag)")
        ("ruwe-scatter", real(s.ruwe_scatter_dex, "DEX"), "scatter of log10 RUWE of well-behaved sources (dex)")
        ("binary-high-ruwe-share", real(s.binary_high_ruwe_share, "FRACTION"), "share of binaries with an elevated RUWE")
        ("binary-high-ruwe-min", real(s.binary_high_ruwe_min, "VALUE"), "elevated RUWE: lower end (log-uniform)")
        ("binary-high-ruwe-max", real(s.binary_high_ruwe_max, "VALUE"), "elevated RUWE: upper end");
    po::options_description companion("Companion catalogue (what the Gaia-like survey misses; simulate --companion-out)");
    CompanionSettings& c = s.companion;
    companion.add_options()
        ("companion-epoch", real(c.epoch_yr, "YEAR"), "epoch of the companion catalogue's positions (Julian year)")
        ("ultracool-min-code", real(c.ultracool_min_code, "CODE"), "earliest ultracool type listed (spectral code; 75 = L5)")
        ("w1-limit", real(c.w1_limit_mag, "MAG"), "WISE-like W1 5-sigma limit; fainter W1 is missing (mag)")
        ("w2-limit", real(c.w2_limit_mag, "MAG"), "WISE-like W2 5-sigma limit: ultracool dwarfs fainter are not listed (mag)")
        ("followup-j-limit", real(c.followup_j_limit_mag, "MAG"), "ultracool dwarfs: J 10-sigma limit of the follow-up (mag)")
        ("followup-h-limit", real(c.followup_h_limit_mag, "MAG"), "ultracool dwarfs: H 10-sigma limit of the follow-up (mag)")
        ("followup-ks-limit", real(c.followup_ks_limit_mag, "MAG"), "ultracool dwarfs: Ks 10-sigma limit of the follow-up (mag)")
        ("ultracool-parallax-error", real(c.ultracool_parallax_error_mas, "MAS"), "ultracool parallax error at W2 <= 13 (mas; 0.2 dex more per mag)")
        ("ultracool-position-error", real(c.ultracool_position_error_arcsec, "ARCSEC"), "ultracool position error per axis (arcsec)")
        ("spectral-type-share", real(c.spectral_type_share, "FRACTION"), "share of companion objects listed with a spectral type")
        ("hipparcos-parallax-error", real(c.hipparcos_parallax_error_mas, "MAS"), "bright stars: parallax error (mas)")
        ("hipparcos-pm-error", real(c.hipparcos_pm_error_mas_per_yr, "MAS_YR"), "bright stars: proper-motion error (mas/yr)")
        ("johnson-error", real(c.johnson_error_mag, "MAG"), "bright stars: Johnson B and V error (mag)")
        ("two-mass-saturation", real(c.two_mass_saturation_mag, "MAG"), "bright stars: 2MASS bands brighter than this are saturated (mag)")
        ("bright-two-mass-error", real(c.bright_two_mass_error_mag, "MAG"), "bright stars: error of saturated 2MASS bands (mag)");
    // clang-format on
    options.add(companion);
    return options;
}

} // namespace starcensus::census::mock
