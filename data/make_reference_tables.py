#!/usr/bin/python3
"""Regenerates the shipped reference tables in data/ from the published files in ../shared/reference/.

Run from the repository root:  /usr/bin/python3 data/make_reference_tables.py ../shared/reference
Only copies and reformats numbers, or evaluates published polynomials (no fitting, no smoothing); the
citations go into each file header.
"""
import pathlib
import sys

reference = pathlib.Path(sys.argv[1] if len(sys.argv) > 1 else "../shared/reference")
data = pathlib.Path(__file__).resolve().parent.parent / "data"

DWARF_HEADER = """\
# Mean main-sequence (dwarf) locus, O3V-Y4V.
# Source: E. Mamajek, "A Modern Mean Dwarf Stellar Color and Effective Temperature Sequence",
#   table version 2024.05.15 (EEM_dwarf_UBVIJHK_colors_Teff.txt, public repository emamajek/SpectralType,
#   commit 6e4681afdb06). Cite: Pecaut & Mamajek 2013, ApJS 208, 9 (Table 5) and Pecaut, Mamajek & Bubar
#   2012, ApJ 756, 154 (Table 3, A/F/G stars); absolute magnitudes, luminosities and L/T/Y rows are only in
#   the online table, not in the 2013 paper.
# Gaia colours and M_G are on the Gaia DR2 system (the source says within ~0.02 mag of DR3).
# M_J, M_Ks are 2MASS, except the Y dwarfs, which the source gives on the MKO J, K system.
# The masses are the source's "tentative" mean masses per subtype.
# Columns (units): spectral_type; teff_k (K); log_l_lsun (log10 L/Lsun); radius_rsun (Rsun);
#   abs_v_mag (M_V, mag); bp_rp_mag (G_BP-G_RP, mag); g_rp_mag (G-G_RP, mag); abs_g_mag (M_G, mag);
#   abs_j_mag (M_J, mag); abs_ks_mag (M_Ks, mag); mass_msun (Msun); w1_w2_mag (WISE W1-W2, mag);
#   b_v_mag (Johnson B-V, mag); j_h_mag (2MASS J-H, mag; MKO for Y dwarfs); ks_w1_mag (Ks-W1, mag).
# `nan` = not given in the source (its `...`). Values the source marks uncertain with ':' are KEPT with
#   the colon removed: {uncertain}.
# Copied without change by data/make_reference_tables.py.
"""

WD_HEADER = """\
# Synthetic photometry of {kind}-atmosphere white dwarfs (MODELS, not observations):
#   5 log g (7.0-9.0) x {nteff} Teff ({tmin}-{tmax} K).
# Source: Montreal white-dwarf photometry tables of the Bergeron group, file
#   Montreal_WD_Table_{atm}_13012021.txt (13 Jan 2021), as redistributed in the public repository
#   cylammarco/WDPhotTools (BSD-3), src/WDPhotTools/wd_photometry/, commit 0a8c24c15f87.
# Cite: Holberg & Bergeron 2006, AJ 132, 1221; Tremblay et al. 2011, ApJ 730, 128; Bedard et al. 2020,
#   ApJ 901, 93 (this citation list is from memory, not read from the table).
# Columns (units): teff_k (K); log_g (log10 cm s^-2); mass_msun (Msun); abs_g_mag, abs_bp_mag,
#   abs_rp_mag (absolute Gaia EDR3 G, G_BP, G_RP: the source's G3, G3_BP, G3_RP; mag);
#   cooling_age_yr (yr).
# Copied without change by data/make_reference_tables.py.
"""


def number(token):
    return "nan" if set(token) <= {"."} else token.rstrip(":")


def dwarf_table():
    columns = ["SpT", "Teff", "logL", "R_Rsun", "Mv", "Bp-Rp", "G-Rp", "M_G", "M_J", "M_Ks", "Msun", "W1-W2", "B-V", "J-H",
               "Ks-W1"]
    names = ["spectral_type", "teff_k", "log_l_lsun", "radius_rsun", "abs_v_mag", "bp_rp_mag", "g_rp_mag",
             "abs_g_mag", "abs_j_mag", "abs_ks_mag", "mass_msun", "w1_w2_mag",
             "b_v_mag", "j_h_mag", "ks_w1_mag"]
    header = None
    rows, uncertain = [], []
    for line in (reference / "EEM_dwarf_UBVIJHK_colors_Teff.txt").read_text().splitlines():
        tokens = line.split()
        if line.startswith("#SpT"):
            header = header or [tokens[0].lstrip("#")] + tokens[1:]
            continue
        if header is None or not tokens or len(tokens) != len(header):
            continue
        if tokens[0] != tokens[-1]:
            continue
        picked = [tokens[header.index(c)] for c in columns]
        uncertain += [f"{picked[0]} {names[i]}" for i, t in enumerate(picked) if t.endswith(":")]
        rows.append([picked[0]] + [number(t) for t in picked[1:]])
    text = DWARF_HEADER.format(uncertain=", ".join(uncertain))
    widths = [max(len(r[i]) for r in rows + [names]) for i in range(len(names))]
    for r in [names] + rows:
        text += ("#" if r is names else " ") + "  ".join(v.ljust(w) for v, w in zip(r, widths)).rstrip() + "\n"
    (data / "dwarf_locus_pecaut_mamajek.txt").write_text(text)


def white_dwarf_table(atm, kind):
    lines = (reference / f"Montreal_WD_Table_{atm}_13012021.txt").read_text().splitlines()
    # Column positions in the source: Teff 0, log g 1, M/Mo 2, G3 38, G3_BP 39, G3_RP 40, Age 43 (the DB
    # header omits the Age label, but every row has the column).
    rows = [t for t in (l.split() for l in lines[2:]) if len(t) == 44]
    picked = [[r[0].rstrip("."), r[1], r[2], r[38], r[39], r[40], r[43]] for r in rows]
    teffs = sorted({float(r[0]) for r in picked})
    text = WD_HEADER.format(kind=kind, atm=atm, nteff=len(teffs), tmin=int(teffs[0]), tmax=int(teffs[-1]))
    names = ["teff_k", "log_g", "mass_msun", "abs_g_mag", "abs_bp_mag", "abs_rp_mag", "cooling_age_yr"]
    text += "#" + "  ".join(names) + "\n"
    for r in picked:
        text += " " + "  ".join(r) + "\n"
    (data / f"white_dwarf_montreal_{atm.lower()}.txt").write_text(text)


WISE_HEADER = """\
# WISE absolute magnitudes M_W1, M_W2 of ultracool dwarfs against spectral type, M6V-Y4V, with the
#   intrinsic scatter of each relation (mag). Used by photometry/BandMatch beyond M6V (earlier types take
#   M_Ks - (Ks-W1) and W1-W2 of the Pecaut & Mamajek locus).
# M6V-T9V: the polynomial fits of absolute magnitude against type of Dupuy & Liu 2012, ApJS 201, 19:
#   M = sum c_i x^i with x = the paper's numeric type (M6 = 6, L0 = 10, T0 = 20, T9 = 29), valid M6-T9; their rms is the
#   scatter column. Coefficients as transcribed in SPLAT (Burgasser et al. 2017), public repository
#   aburgasser/splat, splat/empirical.py, commit 07af68e11c54 (read there, not in the paper), highest
#   power first:
#   W1 {w1}, rms 0.39;
#   W2 {w2}, rms 0.35.
#   Evaluated here at whole and half subtypes.
# Y0V-Y4V: M_W2 FROM MEMORY (a recollection of the trend of Kirkpatrick et al. 2019, ApJS 240, 19 and
#   2021, ApJS 253, 7, not read from either paper; scatter 0.5 mag, from memory). M_W1 = M_W2 + the
#   locus W1-W2 of data/dwarf_locus_pecaut_mamajek.txt at that type (which its source took from the
#   Kirkpatrick et al. 2019 polynomial), so the W1-W2 colour of the two tables agrees there.
#   Kirkpatrick et al. 2019's Y dwarfs are the sample these recalled relations describe: a test on them is
#   not independent (tests/photometry/BandMatchTest.cpp says so).
# Columns (units): spectral_type; abs_w1_mag (M_W1, mag); abs_w2_mag (M_W2, mag); scatter_w1_mag,
#   scatter_w2_mag (intrinsic scatter, mag); source (DL12 = Dupuy & Liu 2012; memory = from memory).
# Written by data/make_reference_tables.py.
"""

# Dupuy & Liu 2012 via SPLAT (see WISE_HEADER): highest power first.
DUPUY_LIU_W1 = [1.58040e-5, -3.33944e-4, -4.38105e-3, 3.55395e-1, 7.14765]
DUPUY_LIU_W2 = [1.78555e-5, -8.81973e-4, 1.14325e-2, 1.92354e-1, 7.46564]
# From memory (see WISE_HEADER): M_W2 of Y0V, Y0.5V, Y1V, Y1.5V, Y2V, Y4V.
Y_DWARF_ABS_W2 = [("Y0V", 15.0), ("Y0.5V", 15.4), ("Y1V", 15.8), ("Y1.5V", 16.1), ("Y2V", 16.4), ("Y4V", 17.2)]


def polynomial(coefficients, x):
    value = 0.0
    for c in coefficients:
        value = value * x + c
    return value


def wise_table():
    locus_w1_w2 = {}
    for line in (data / "dwarf_locus_pecaut_mamajek.txt").read_text().splitlines():
        if line.startswith("#spectral_type"):
            names = line[1:].split()
        elif not line.startswith("#"):
            tokens = line.split()
            locus_w1_w2[tokens[0]] = float(tokens[names.index("w1_w2_mag")])
    rows = []
    for half_subtypes in range(2 * 6, 2 * 29 + 1):  # M6 (x = 6) to T9 (x = 29)
        x = half_subtypes / 2.0
        letter = "M" if x < 10 else "L" if x < 20 else "T"
        subtype = x - (0 if x < 10 else 10 if x < 20 else 20)
        label = f"{letter}{subtype:g}V"
        rows.append([label, f"{polynomial(DUPUY_LIU_W1, x):.3f}", f"{polynomial(DUPUY_LIU_W2, x):.3f}", "0.39",
                     "0.35", "DL12"])
    for label, abs_w2 in Y_DWARF_ABS_W2:
        rows.append([label, f"{abs_w2 + locus_w1_w2[label]:.3f}", f"{abs_w2:.3f}", "0.5", "0.5", "memory"])
    names = ["spectral_type", "abs_w1_mag", "abs_w2_mag", "scatter_w1_mag", "scatter_w2_mag", "source"]
    text = WISE_HEADER.format(w1=DUPUY_LIU_W1, w2=DUPUY_LIU_W2)
    widths = [max(len(r[i]) for r in rows + [names]) for i in range(len(names))]
    for r in [names] + rows:
        text += ("#" if r is names else " ") + "  ".join(v.ljust(w) for v, w in zip(r, widths)).rstrip() + "\n"
    (data / "ultracool_wise_absolute_magnitudes.txt").write_text(text)


dwarf_table()
white_dwarf_table("DA", "hydrogen (DA)")
white_dwarf_table("DB", "helium (DB)")
wise_table()
