#!/usr/bin/python3
"""SHA-256 of a file with Python's hashlib, for the provenance checksum test (tests/reports).

Usage: sha256_file.py FILE  -> prints the 64 hex digits.
"""
import hashlib
import sys

with open(sys.argv[1], "rb") as handle:
    print(hashlib.sha256(handle.read()).hexdigest())
