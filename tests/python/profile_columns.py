#!/usr/bin/python3
"""Independent column profile for the cross-check of inspect's (tests/photometry/catalog).

Usage: profile_columns.py FILE [HDU]

FITS (HDU given): read with astropy.table.Table, which applies TSCAL/TZERO; a cell is null when masked,
NaN, or (integer columns) equal to TNULLn as stored, before scaling (FITS Standard 4.0, section 7.3.2;
astropy 5.2 leaves TNULL unmasked in scaled columns, so the stored integers are compared here). Only
scalar numeric and character columns are profiled; a character cell is null when blank.
CSV (no HDU): Python's csv module; lines starting with '#' and blank lines are skipped; a cell is null
when it is empty, "nan" (any case) or a not-measured mark ("-", "--", "---", "..."), a number when float() reads it, text otherwise.
Prints JSON {name: {"nulls": n, "numbers": n, "texts": n, "min": x or null, "max": x or null}}.
"""
import csv
import json
import math
import sys

import numpy as np


def summary(cells):
    """cells: a list of None (null), float (number) or str (text)."""
    numbers = [cell for cell in cells if isinstance(cell, float)]
    return {
        "nulls": sum(cell is None for cell in cells),
        "numbers": len(numbers),
        "texts": sum(isinstance(cell, str) for cell in cells),
        "min": min(numbers) if numbers else None,
        "max": max(numbers) if numbers else None,
    }


def csv_cell(text):
    text = text.strip().strip('"').strip()
    if text == "" or text.lower() == "nan" or text in ("-", "--", "---", "..."):
        return None
    try:
        return float(text)
    except ValueError:
        return text


def profile_csv(path):
    with open(path, newline="") as stream:
        lines = [line for line in stream if line.strip() and not line.lstrip().startswith("#")]
    rows = list(csv.reader(lines))
    header, body = rows[0], rows[1:]
    return {name.strip(): summary([csv_cell(row[i]) for row in body]) for i, name in enumerate(header)}


def profile_fits(path, hdu_index):
    from astropy.io import fits
    from astropy.table import Table

    table = Table.read(path, hdu=hdu_index)
    result = {}
    with fits.open(path) as hdus:
        hdu = hdus[hdu_index]
        for name in table.colnames:
            column = table[name]
            stored = hdu.data.base[name]
            if stored.ndim != 1:
                continue  # vectors are not profiled
            mask = np.ma.getmaskarray(column)
            if stored.dtype.kind in "SU":
                texts = [str(value).strip() for value in np.ma.getdata(column)]
                result[name] = summary([None if masked or not text else text for text, masked in zip(texts, mask)])
                continue
            if column.dtype.kind not in "iuf":
                continue  # logical columns are not profiled
            null = hdu.columns[name].null
            if isinstance(null, int) and np.issubdtype(stored.dtype, np.integer):
                mask = mask | (stored == null)
            values = np.array(np.ma.getdata(column), dtype=np.float64)
            result[name] = summary(
                [None if masked or math.isnan(value) else float(value) for value, masked in zip(values, mask)])
    return result


def main(arguments):
    profile = profile_fits(arguments[0], int(arguments[1])) if len(arguments) > 1 else profile_csv(arguments[0])
    json.dump(profile, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1:])
