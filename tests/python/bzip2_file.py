"""Writes SOURCE bzip2-compressed to TARGET, for the reader test of the compressed forms cfitsio inflates
itself (neither plain nor gzip). Usage: bzip2_file.py SOURCE TARGET"""
import bz2
import sys

with open(sys.argv[1], "rb") as source, bz2.open(sys.argv[2], "wb") as target:
    target.write(source.read())
