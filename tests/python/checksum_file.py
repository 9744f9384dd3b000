#!/usr/bin/python3
"""Checksum of a file with Python's hashlib (sha256) or the python3-xxhash binding of libxxhash (xxh128),
for the provenance checksum tests (tests/reports).

Usage: checksum_file.py sha256|xxh128 FILE  -> prints the hex digest.
"""
import hashlib
import sys

import xxhash

algorithm, path = sys.argv[1], sys.argv[2]
with open(path, "rb") as handle:
    data = handle.read()
print(hashlib.sha256(data).hexdigest() if algorithm == "sha256" else xxhash.xxh3_128_hexdigest(data))
