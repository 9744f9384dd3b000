#!/usr/bin/python3
"""Writes a benchmark input in the layout of the Gaia DR3 bulk release's gaia_source files: ECSV 1.0,
comma-delimited, "null" for missing values, 152 columns, from a mock catalogue of our own simulator
(bench/make_bench_catalog). Not a test.

Usage: make_gaia_ecsv.py MOCK.fits OUTPUT.csv[.gz] [GZIP_LEVEL]

The column names, their order, datatypes and units are the gaia_source table's as recalled (from memory,
not read from the release; the release's own header also carries descriptions and meta entries). The
astrometry and photometry columns the census reads come from the mock (source_id, ra, dec, parallax,
parallax_error, pmra, pmdec, G/BP/RP magnitudes and flux-over-error, ruwe); every other column is filled
with random values of the column's type and typical magnitude, and the radial-velocity, RVS and GSP-Phot
groups are null in most rows, as they are in the release, so that the text is about as long (~1 KB a
row) and about as compressible as the release's. The header is written by astropy's ECSV writer; the rows
are formatted with NumPy (shortest round-trip decimals, as astropy writes them) for speed.
"""
import gzip
import io
import sys

import numpy as np
from astropy.io import fits
from astropy.table import Table

# (name, datatype, unit, filler): filler is a mock column name, or a random kind:
#   ("f", low, high[, null_share]) float64, ("s", low, high[, null_share]) float32, ("i", low, high) int,
#   ("b", share_true) bool, ("t", text) constant text.
COLUMNS = [
    ("solution_id", "int64", None, ("i", 375316653866487564, 375316653866487565)),
    ("designation", "string", None, ("designation",)),
    ("source_id", "int64", None, "source_id"),
    ("random_index", "int64", None, ("i", 0, 1811709770)),
    ("ref_epoch", "float64", "yr", ("f", 2016.0, 2016.0)),
    ("ra", "float64", "deg", "ra"),
    ("ra_error", "float32", "mas", ("s", 0.01, 2.0)),
    ("dec", "float64", "deg", "dec"),
    ("dec_error", "float32", "mas", ("s", 0.01, 2.0)),
    ("parallax", "float64", "mas", "parallax"),
    ("parallax_error", "float32", "mas", "parallax_error"),
    ("parallax_over_error", "float32", None, ("s", -5.0, 200.0)),
    ("pm", "float32", "mas / yr", ("s", 0.0, 300.0)),
    ("pmra", "float64", "mas / yr", "pmra"),
    ("pmra_error", "float32", "mas / yr", ("s", 0.01, 3.0)),
    ("pmdec", "float64", "mas / yr", "pmdec"),
    ("pmdec_error", "float32", "mas / yr", ("s", 0.01, 3.0)),
]
COLUMNS += [(f"{a}_{b}_corr", "float32", None, ("s", -1.0, 1.0))
            for a, b in [("ra", "dec"), ("ra", "parallax"), ("ra", "pmra"), ("ra", "pmdec"),
                         ("dec", "parallax"), ("dec", "pmra"), ("dec", "pmdec"), ("parallax", "pmra"),
                         ("parallax", "pmdec"), ("pmra", "pmdec")]]
COLUMNS += [
    ("astrometric_n_obs_al", "int16", None, ("i", 50, 800)),
    ("astrometric_n_obs_ac", "int16", None, ("i", 0, 800)),
    ("astrometric_n_good_obs_al", "int16", None, ("i", 50, 800)),
    ("astrometric_n_bad_obs_al", "int16", None, ("i", 0, 20)),
    ("astrometric_gof_al", "float32", None, ("s", -5.0, 50.0)),
    ("astrometric_chi2_al", "float32", None, ("s", 50.0, 5000.0)),
    ("astrometric_excess_noise", "float32", "mas", ("s", 0.0, 2.0)),
    ("astrometric_excess_noise_sig", "float32", None, ("s", 0.0, 50.0)),
    ("astrometric_params_solved", "int8", None, ("i", 31, 32)),
    ("astrometric_primary_flag", "bool", None, ("b", 0.1)),
    ("nu_eff_used_in_astrometry", "float32", "1 / um", ("s", 1.2, 1.9, 0.3)),
    ("pseudocolour", "float32", "1 / um", ("s", 1.2, 1.9, 0.7)),
    ("pseudocolour_error", "float32", "1 / um", ("s", 0.01, 0.2, 0.7)),
    ("ra_pseudocolour_corr", "float32", None, ("s", -1.0, 1.0, 0.7)),
    ("dec_pseudocolour_corr", "float32", None, ("s", -1.0, 1.0, 0.7)),
    ("parallax_pseudocolour_corr", "float32", None, ("s", -1.0, 1.0, 0.7)),
    ("pmra_pseudocolour_corr", "float32", None, ("s", -1.0, 1.0, 0.7)),
    ("pmdec_pseudocolour_corr", "float32", None, ("s", -1.0, 1.0, 0.7)),
    ("astrometric_matched_transits", "int16", None, ("i", 5, 100)),
    ("visibility_periods_used", "int16", None, ("i", 5, 30)),
    ("astrometric_sigma5d_max", "float32", "mas", ("s", 0.01, 5.0)),
    ("matched_transits", "int16", None, ("i", 5, 100)),
    ("new_matched_transits", "int16", None, ("i", 0, 50)),
    ("matched_transits_removed", "int16", None, ("i", 0, 10)),
    ("ipd_gof_harmonic_amplitude", "float32", None, ("s", 0.0, 0.5)),
    ("ipd_gof_harmonic_phase", "float32", "deg", ("s", 0.0, 180.0)),
    ("ipd_frac_multi_peak", "int8", None, ("i", 0, 10)),
    ("ipd_frac_odd_win", "int8", None, ("i", 0, 10)),
    ("ruwe", "float32", None, "ruwe"),
]
COLUMNS += [(f"scan_direction_strength_k{k}", "float32", None, ("s", 0.0, 1.0)) for k in range(1, 5)]
COLUMNS += [(f"scan_direction_mean_k{k}", "float32", "deg", ("s", -180.0, 180.0)) for k in range(1, 5)]
COLUMNS += [("duplicated_source", "bool", None, ("b", 0.01))]
for band, mag in [("g", "phot_g_mean_mag"), ("bp", "phot_bp_mean_mag"), ("rp", "phot_rp_mean_mag")]:
    COLUMNS += [
        (f"phot_{band}_n_obs", "int16", None, ("i", 50, 600)),
        (f"phot_{band}_mean_flux", "float64", "electron / s", ("f", 100.0, 1e6)),
        (f"phot_{band}_mean_flux_error", "float32", "electron / s", ("s", 1.0, 1e3)),
        (f"phot_{band}_mean_flux_over_error", "float32", None, f"phot_{band}_mean_flux_over_error"),
        (mag, "float32", "mag", mag),
    ]
COLUMNS += [
    ("phot_bp_rp_excess_factor", "float32", None, ("s", 1.1, 1.5)),
    ("phot_bp_n_contaminated_transits", "int16", None, ("i", 0, 10)),
    ("phot_bp_n_blended_transits", "int16", None, ("i", 0, 10)),
    ("phot_rp_n_contaminated_transits", "int16", None, ("i", 0, 10)),
    ("phot_rp_n_blended_transits", "int16", None, ("i", 0, 10)),
    ("phot_proc_mode", "int8", None, ("i", 0, 2)),
    ("bp_rp", "float32", "mag", ("s", -0.5, 4.0)),
    ("bp_g", "float32", "mag", ("s", -0.5, 2.0)),
    ("g_rp", "float32", "mag", ("s", -0.5, 2.0)),
    ("radial_velocity", "float32", "km / s", ("s", -100.0, 100.0, 0.98)),
    ("radial_velocity_error", "float32", "km / s", ("s", 0.1, 10.0, 0.98)),
    ("rv_method_used", "int8", None, ("i", 1, 3)),
    ("rv_nb_transits", "int16", None, ("i", 0, 40)),
    ("rv_nb_deblended_transits", "int16", None, ("i", 0, 5)),
    ("rv_visibility_periods_used", "int16", None, ("i", 0, 20)),
    ("rv_expected_sig_to_noise", "float32", None, ("s", 1.0, 100.0, 0.98)),
    ("rv_renormalised_gof", "float32", None, ("s", 0.0, 10.0, 0.98)),
    ("rv_chisq_pvalue", "float32", None, ("s", 0.0, 1.0, 0.98)),
    ("rv_time_duration", "float32", "d", ("s", 100.0, 1000.0, 0.98)),
    ("rv_amplitude_robust", "float32", "km / s", ("s", 0.0, 50.0, 0.98)),
    ("rv_template_teff", "float32", "K", ("s", 3000.0, 8000.0, 0.98)),
    ("rv_template_logg", "float32", "log(cm.s**-2)", ("s", 1.0, 5.0, 0.98)),
    ("rv_template_fe_h", "float32", "dex", ("s", -1.5, 0.5, 0.98)),
    ("rv_atm_param_origin", "int16", None, ("i", 0, 1000)),
    ("vbroad", "float32", "km / s", ("s", 0.0, 100.0, 0.995)),
    ("vbroad_error", "float32", "km / s", ("s", 0.0, 20.0, 0.995)),
    ("vbroad_nb_transits", "int16", None, ("i", 0, 40)),
    ("grvs_mag", "float32", "mag", ("s", 8.0, 14.0, 0.98)),
    ("grvs_mag_error", "float32", "mag", ("s", 0.0, 0.1, 0.98)),
    ("grvs_mag_nb_transits", "int16", None, ("i", 0, 40)),
    ("rvs_spec_sig_to_noise", "float32", None, ("s", 1.0, 100.0, 0.995)),
    ("phot_variable_flag", "string", None, ("t", "NOT_AVAILABLE")),
    ("l", "float64", "deg", ("f", 0.0, 360.0)),
    ("b", "float64", "deg", ("f", -90.0, 90.0)),
    ("ecl_lon", "float64", "deg", ("f", 0.0, 360.0)),
    ("ecl_lat", "float64", "deg", ("f", -90.0, 90.0)),
    ("in_qso_candidates", "bool", None, ("b", 0.003)),
    ("in_galaxy_candidates", "bool", None, ("b", 0.001)),
    ("non_single_star", "int16", None, ("i", 0, 1)),
    ("has_xp_continuous", "bool", None, ("b", 0.1)),
    ("has_xp_sampled", "bool", None, ("b", 0.1)),
    ("has_rvs", "bool", None, ("b", 0.001)),
    ("has_epoch_photometry", "bool", None, ("b", 0.006)),
    ("has_epoch_rv", "bool", None, ("b", 0.0)),
    ("has_mcmc_gspphot", "bool", None, ("b", 0.2)),
    ("has_mcmc_msc", "bool", None, ("b", 0.2)),
    ("in_andromeda_survey", "bool", None, ("b", 0.0)),
    ("classprob_dsc_combmod_quasar", "float32", None, ("s", 0.0, 0.01, 0.2)),
    ("classprob_dsc_combmod_galaxy", "float32", None, ("s", 0.0, 0.01, 0.2)),
    ("classprob_dsc_combmod_star", "float32", None, ("s", 0.98, 1.0, 0.2)),
]
for name, unit, low, high in [("teff_gspphot", "K", 3000.0, 8000.0), ("logg_gspphot", "log(cm.s**-2)", 3.0, 5.0),
                              ("mh_gspphot", "dex", -2.0, 0.5), ("distance_gspphot", "pc", 100.0, 5000.0),
                              ("azero_gspphot", "mag", 0.0, 3.0), ("ag_gspphot", "mag", 0.0, 2.5),
                              ("ebpminrp_gspphot", "mag", 0.0, 1.5)]:
    COLUMNS += [(f"{name}{suffix}", "float32", unit, ("s", low, high, 0.7))
                for suffix in ("", "_lower", "_upper")]
COLUMNS += [("libname_gspphot", "string", None, ("t", "MARCS"))]


def header_text():
    """The ECSV header astropy writes for the layout (a table with no rows)."""
    dtypes = {"float64": np.float64, "float32": np.float32, "int64": np.int64, "int16": np.int16,
              "int8": np.int8, "bool": np.bool_, "string": "U20"}
    table = Table()
    for name, datatype, unit, _ in COLUMNS:
        table[name] = np.zeros(0, dtype=dtypes[datatype])
        if unit:
            table[name].unit = unit
    out = io.StringIO()
    table.write(out, format="ascii.ecsv", delimiter=",")
    return out.getvalue()


def column_text(datatype, filler, mock, rng, rows):
    """One column of `rows` cells as text ("null" where missing)."""
    if isinstance(filler, str):
        values = mock[filler]
        text = values.astype(str)
        if values.dtype.kind == "f":
            text = np.where(np.isnan(values), "null", text)
        return text.astype(object)
    kind = filler[0]
    if kind == "designation":
        return ("Gaia DR3 " + mock["source_id"].astype(str).astype(object))
    if kind == "t":
        return np.full(rows, filler[1], dtype=object)
    if kind == "b":
        return np.where(rng.random(rows) < filler[1], "True", "False").astype(object)
    if kind == "i":
        return rng.integers(filler[1], filler[2], size=rows, endpoint=filler[1] == filler[2]).astype(str).astype(object)
    values = rng.uniform(filler[1], filler[2], size=rows)
    values = values.astype(np.float32) if kind == "s" else values
    text = values.astype(str)
    if len(filler) > 3:
        text = np.where(rng.random(rows) < filler[3], "null", text)
    return text.astype(object)


def main():
    if len(sys.argv) < 3:
        sys.exit("usage: make_gaia_ecsv.py MOCK.fits OUTPUT.csv[.gz] [GZIP_LEVEL]")
    source, output = sys.argv[1], sys.argv[2]
    level = int(sys.argv[3]) if len(sys.argv) > 3 else 6
    rng = np.random.default_rng(1)
    header = header_text()
    opener = (lambda: gzip.open(output, "wt", compresslevel=level)) if output.endswith(".gz") \
        else (lambda: open(output, "w"))
    with fits.open(source, memmap=True) as hdus, opener() as out:
        data = hdus[1].data
        total = len(data)
        out.write(header)
        chunk = 50000
        for start in range(0, total, chunk):
            part = data[start:start + chunk]
            mock = {name: np.asarray(part[name]) for name in part.names}
            rows = len(part)
            cells = [column_text(datatype, filler, mock, rng, rows) for _, datatype, _, filler in COLUMNS]
            lines = cells[0]
            for column in cells[1:]:
                lines = lines + "," + column
            out.write("\n".join(lines))
            out.write("\n")
    print(f"{output}: {total} rows, {len(COLUMNS)} columns")


if __name__ == "__main__":
    main()
