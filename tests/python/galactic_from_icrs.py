"""ICRS -> Galactic with astropy (Debian package python3-astropy): the independent reference for
reports/SkyMap.cpp. astropy's Galactic frame follows the IAU 1958 definition through FK4/FK5 and
includes the ICRS-FK5 frame bias, which the Hipparcos matrix leaves out (Liu et al. 2011, A&A 526, A16).
Run with /usr/bin/python3:
  galactic_from_icrs.py RA1 DEC1 RA2 DEC2 ...   (degrees) -> one "l b" line (degrees) per position
"""
import sys

import astropy.units as u
from astropy.coordinates import SkyCoord

values = [float(v) for v in sys.argv[1:]]
for ra, dec in zip(values[0::2], values[1::2]):
    galactic = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, frame="icrs").galactic
    print(f"{galactic.l.deg:.10f} {galactic.b.deg:.10f}")
