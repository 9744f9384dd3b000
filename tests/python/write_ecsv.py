#!/usr/bin/python3
"""Writes a FITS table as astropy writes archive formats, for the ECSV/CSV reader tests (tests/reports).

Usage: write_ecsv.py FITS OUTDIR

Reads the first table HDU with astropy.table.Table (units from TUNITn, NaN as missing) and writes, with
astropy's own writers:
  OUTDIR/table.ecsv      ECSV 1.0 (ascii.ecsv), each column's TUCDn kept as meta.ucd (astropy does not
                         carry TUCD from FITS by itself)
  OUTDIR/table.ecsv.gz   the same, gzip-compressed
  OUTDIR/table_comma.ecsv  ECSV with delimiter ',' (the Gaia bulk releases' layout)
  OUTDIR/table.csv.gz    plain CSV (ascii.csv, no units), gzip-compressed
  OUTDIR/table_tabledata.vot, table_binary.vot, table_binary2.vot
                         VOTable (astropy.io.votable) in each serialisation, meta.ucd as the FIELD ucd
  OUTDIR/table_binary2.vot.gz  the BINARY2 one, gzip-compressed
  OUTDIR/table.ecsv.bz2, table_binary2.vot.bz2  bzip2-compressed copies (Python's bz2 module)
  OUTDIR/table.csv.bz2   the CSV as two bzip2 streams one after the other (as pbzip2 writes them)
"""
import bz2
import gzip
import shutil
import sys

from astropy.io import fits
from astropy.table import Table

fits_path, outdir = sys.argv[1], sys.argv[2]
with fits.open(fits_path) as hdus:
    hdu_index = next(i for i, h in enumerate(hdus) if isinstance(h, fits.BinTableHDU))
    header = hdus[hdu_index].header
table = Table.read(fits_path, hdu=hdu_index)
for number, name in enumerate(table.colnames, start=1):
    ucd = header.get(f"TUCD{number}")
    if ucd:
        table[name].meta["ucd"] = ucd
table.write(f"{outdir}/table.ecsv", format="ascii.ecsv", overwrite=True)
table.write(f"{outdir}/table_comma.ecsv", format="ascii.ecsv", delimiter=",", overwrite=True)
with open(f"{outdir}/table.ecsv", "rb") as source, gzip.open(f"{outdir}/table.ecsv.gz", "wb") as target:
    shutil.copyfileobj(source, target)
table.write(f"{outdir}/table.csv", format="ascii.csv", overwrite=True)
with open(f"{outdir}/table.csv", "rb") as source, gzip.open(f"{outdir}/table.csv.gz", "wb") as target:
    shutil.copyfileobj(source, target)
for serialisation in ("tabledata", "binary", "binary2"):
    table.write(f"{outdir}/table_{serialisation}.vot", format="votable", tabledata_format=serialisation,
                overwrite=True)
with open(f"{outdir}/table_binary2.vot", "rb") as source, gzip.open(f"{outdir}/table_binary2.vot.gz", "wb") as target:
    shutil.copyfileobj(source, target)
for name in ("table.ecsv", "table_binary2.vot"):
    with open(f"{outdir}/{name}", "rb") as source, bz2.open(f"{outdir}/{name}.bz2", "wb") as target:
        shutil.copyfileobj(source, target)
with open(f"{outdir}/table.csv", "rb") as source:
    text = source.read()
with open(f"{outdir}/table.csv.bz2", "wb") as target:
    target.write(bz2.compress(text[: len(text) // 2]) + bz2.compress(text[len(text) // 2 :]))
print("ok")
