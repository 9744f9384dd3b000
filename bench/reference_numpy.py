#!/usr/bin/python3
"""The census a researcher would write with NumPy and astropy, for the side-by-side benchmark only.

Same steps as `starcensus run`: read the FITS table (astropy.io.fits), select the candidates
(parallax + 3 sigma > 1000 / R_max, common practice, no source), remove RUWE > 1.4 (Lindegren 2018,
GAIA-C3-TN-LU-LL-124; from memory), classify by the dwarf colour table (np.interp of BP-RP on the
Pecaut & Mamajek locus in data/, white dwarfs 4 mag below the locus, common practice, no source), and a
vectorised Monte Carlo over parallax and photometric errors for the class fractions per radius.
The membership here is the plain "drawn parallax beyond 1000 / R" rule, not starcensus's posterior:
the point is the cost of the straightforward approach, not identical numbers.
Usage: /usr/bin/python3 reference_numpy.py CATALOG.fits LOCUS.txt [draws] [radii_pc comma-separated]
"""
import sys
import time

import numpy as np
from astropy.io import fits


def load_locus(path):
    # Column names from the table's own header line ("#spectral_type teff_k ..."), so a column added
    # to the shipped table does not break the script.
    with open(path, encoding="ascii") as table_file:
        names = next(line for line in table_file if line.startswith("#spectral_type")).lstrip("#").split()
    table = np.genfromtxt(path, comments="#", dtype=None, encoding="ascii", names=names)
    usable = np.isfinite(table["bp_rp_mag"]) & np.isfinite(table["abs_g_mag"])
    table = table[usable]
    order = np.argsort(table["bp_rp_mag"], kind="stable")
    return table[order]


def main():
    path, locus_path = sys.argv[1], sys.argv[2]
    draws = int(sys.argv[3]) if len(sys.argv) > 3 else 1000
    radii = np.array([float(r) for r in (sys.argv[4] if len(sys.argv) > 4 else "10,25").split(",")])
    start = time.perf_counter()

    with fits.open(path) as hdul:
        data = hdul[1].data
        plx = np.asarray(data["parallax"], dtype=np.float64)
        plx_err = np.asarray(data["parallax_error"], dtype=np.float64)
        keep = np.isfinite(plx) & np.isfinite(plx_err) & (plx_err > 0)
        keep &= plx + 3.0 * plx_err > 1000.0 / radii.max()
        ruwe = np.asarray(data["ruwe"], dtype=np.float64)
        keep &= ~(ruwe > 1.4)
        plx, plx_err = plx[keep], plx_err[keep]
        g = np.asarray(data["phot_g_mean_mag"], dtype=np.float64)[keep]
        bp = np.asarray(data["phot_bp_mean_mag"], dtype=np.float64)[keep]
        rp = np.asarray(data["phot_rp_mean_mag"], dtype=np.float64)[keep]
        g_err = 1.0857362 / np.asarray(data["phot_g_mean_flux_over_error"], dtype=np.float64)[keep]
        bp_err = 1.0857362 / np.asarray(data["phot_bp_mean_flux_over_error"], dtype=np.float64)[keep]
        rp_err = 1.0857362 / np.asarray(data["phot_rp_mean_flux_over_error"], dtype=np.float64)[keep]
    read_s = time.perf_counter() - start

    locus = load_locus(locus_path)
    locus_colour = locus["bp_rp_mag"]
    locus_abs_g = locus["abs_g_mag"]
    letters = np.array([t[0] for t in locus["spectral_type"]])
    class_names = sorted(set(letters)) + ["WD", "unclassified"]
    letter_index = np.array([class_names.index(c) for c in letters])
    wd_index, none_index = len(class_names) - 2, len(class_names) - 1

    colour = bp - rp
    colour_err = np.sqrt(np.nan_to_num(bp_err) ** 2 + np.nan_to_num(rp_err) ** 2)
    g_err = np.nan_to_num(g_err)
    rng = np.random.default_rng(1)
    counts = np.zeros((draws, radii.size, len(class_names)), dtype=np.int64)
    chunk = max(1, 20_000_000 // max(1, plx.size))  # draws per vectorised step, bounded memory
    for first in range(0, draws, chunk):
        n = min(chunk, draws - first)
        plx_draw = plx + plx_err * rng.standard_normal((n, plx.size))
        g_draw = g + g_err * rng.standard_normal((n, plx.size))
        colour_draw = colour + colour_err * rng.standard_normal((n, plx.size))
        with np.errstate(invalid="ignore", divide="ignore"):
            abs_g = g_draw + 5.0 * np.log10(plx_draw) - 10.0
        node = np.rint(np.nan_to_num(np.interp(colour_draw, locus_colour, np.arange(locus_colour.size))))
        node = node.astype(int)
        node = np.clip(node, 0, locus_colour.size - 1)
        cls = letter_index[node]
        cls = np.where(abs_g > locus_abs_g[node] + 4.0, wd_index, cls)
        cls = np.where(np.isfinite(abs_g) & np.isfinite(colour_draw) & (plx > 5.0 * plx_err), cls, none_index)
        for r, radius in enumerate(radii):
            member = plx_draw > 1000.0 / radius
            for c in range(len(class_names)):
                counts[first:first + n, r, c] = np.sum(member & (cls == c), axis=1)
    total = counts.sum(axis=2, keepdims=True)
    fractions = np.where(total > 0, counts / np.maximum(total, 1), 0.0)
    elapsed = time.perf_counter() - start
    for r, radius in enumerate(radii):
        median = np.median(fractions[:, r, :], axis=0)
        shown = " ".join(f"{name}={median[c]:.3f}" for c, name in enumerate(class_names) if median[c] > 0)
        print(f"numpy: R={radius:g} pc members {np.median(total[:, r, 0]):.0f}: {shown}")
    print(f"numpy: candidates {plx.size}, read+select {read_s:.2f} s, total {elapsed:.2f} s")


if __name__ == "__main__":
    main()
