#!/usr/bin/python3
"""Independent reading of a FITS table for the reader's cross-check (tests/photometry).

Usage: read_with_astropy.py FILE HDU FIELD=COLUMN...

Reads the table with astropy (astropy.table.Table, which applies TSCAL/TZERO and masks NaN and the TNULL of
unscaled integer columns; astropy 5.2 leaves TNULL unmasked in scaled columns, so the script also compares
the stored integers with TNULLn, as FITS Standard 4.0 section 7.3.2 defines it), converts each column from its TUNIT to the field's unit with astropy.units, and prints JSON
{"rows": N, "fields": {FIELD: [value or null, ...]}} on standard output. A photometric error column
named *flux_over_error* is a signal-to-noise ratio and becomes 2.5 / ln(10) / SNR mag (first-order error
propagation of m = -2.5 log10 F; common practice, no source).
"""
import json
import math
import sys

import numpy as np
from astropy import units as u
from astropy.io import fits
from astropy.table import Table

TARGET_UNITS = {
    "ra": u.deg,
    "dec": u.deg,
    "parallax": u.mas,
    "parallax_error": u.mas,
    "pmra": u.mas / u.yr,
    "pmdec": u.mas / u.yr,
}


def column_values(table, hdu, field, name):
    column = table[name]
    mask = np.ma.getmaskarray(column)
    null = hdu.columns[name].null
    stored = hdu.data.base[name]  # the integers as stored, before TSCAL/TZERO
    if isinstance(null, int) and np.issubdtype(stored.dtype, np.integer):
        mask = mask | (stored == null)
    if field == "source_id":
        data = np.ma.getdata(column)
        return [None if masked else int(value) for value, masked in zip(data, mask)]
    values = np.array(np.ma.getdata(column), dtype=np.float64)
    if field in TARGET_UNITS:
        values = (values * column.unit).to_value(TARGET_UNITS[field])
    elif field.endswith("_error") and "flux_over_error" in name.lower():
        with np.errstate(divide="ignore", invalid="ignore"):
            values = np.where(values > 0, 2.5 / math.log(10.0) / values, np.nan)
    return [None if masked or math.isnan(value) else float(value) for value, masked in zip(values, mask)]


def main(arguments):
    path, hdu = arguments[0], int(arguments[1])
    table = Table.read(path, hdu=hdu)
    fields = {}
    with fits.open(path) as hdus:
        for assignment in arguments[2:]:
            field, name = assignment.split("=", 1)
            fields[field] = column_values(table, hdus[hdu], field, name)
    json.dump({"rows": len(table), "fields": fields}, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1:])
