"""Print, as JSON on stdout, what astropy reads from the first table extension of a FITS file.

Used by the C++ tests as an independent reader (astropy, Debian package python3-astropy): column
names, TFORM codes, units, UCDs (TUCDn), descriptions (TCOMMn), header keywords and values. NaN is
printed as the string "NaN" and entries masked by TNULLn as null, because JSON has no NaN.
Run with /usr/bin/python3: dump_fits_table.py FILE [KEYWORD ...]
"""
import json
import math
import sys

from astropy.io import fits
from astropy.table import Table


def plain(value):
    if value is None:
        return None
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, bytes):
        value = value.decode()
    if isinstance(value, str):
        value = value.rstrip()  # trailing blanks of FITS strings are not significant (FITS 4.0, 7.3.3.1)
    if isinstance(value, float) and math.isnan(value):
        return "NaN"
    return value


def main():
    path = sys.argv[1]
    keywords = sys.argv[2:]
    with fits.open(path) as hdus:
        primary = hdus[0]
        table_hdu = hdus[1]
        header = table_hdu.header
        result = {
            "hdu_count": len(hdus),
            "primary_has_data": primary.data is not None,
            "xtension": header.get("XTENSION"),
            "extname": header.get("EXTNAME"),
            "rows": header.get("NAXIS2"),
            "keywords": {name: plain(header.get(name)) for name in keywords},
            "columns": [],
        }
        table = Table.read(hdus, hdu=1, mask_invalid=False)  # NaN stays NaN; TNULL still masks
        for number, column in enumerate(table_hdu.columns, start=1):
            values = table[column.name]
            mask = getattr(values, "mask", None)
            listed = []
            for row, value in enumerate(values):
                masked = mask is not None and bool(mask[row])
                listed.append(None if masked else plain(value))
            result["columns"].append(
                {
                    "name": column.name,
                    "format": column.format,
                    "unit": None if values.unit is None else values.unit.to_string(),
                    "ucd": header.get("TUCD%d" % number),
                    "comment": header.get("TCOMM%d" % number),
                    "values": listed,
                }
            )
    print(json.dumps(result))


if __name__ == "__main__":
    main()
