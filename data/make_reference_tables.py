#!/usr/bin/python3
"""Regenerates the shipped reference tables in data/ from the published files in ../shared/reference/.

Run from the repository root:  /usr/bin/python3 data/make_reference_tables.py ../shared/reference
Only copies and reformats numbers (no fitting, no smoothing); the citations go into each file header.
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


dwarf_table()
white_dwarf_table("DA", "hydrogen (DA)")
white_dwarf_table("DB", "helium (DB)")
