"""Epoch propagation and positional matching with astropy (Debian package python3-astropy): the
independent reference for census/CatalogMerge.cpp. Positions move with SkyCoord.apply_space_motion
(ERFA pmsafe: straight-line space motion, here with zero radial velocity); matches are
search_around_sky between the rows of file 0 and file 1 at the target epoch.
Run with /usr/bin/python3:
  space_motion_match.py TARGET_EPOCH RADIUS_ARCSEC FILE RA DEC PMRA PMDEC PARALLAX EPOCH ...
  (degrees, mas/yr with pmra including cos dec, mas, Julian years; seven numbers per row)
-> one "position INDEX RA DEC" line (degrees, at TARGET_EPOCH) per row, then one
   "pair INDEX_A INDEX_B SEPARATION_ARCSEC" line per match (row indices in argument order).
"""
import sys
import warnings

import astropy.units as u
import numpy as np
from astropy.coordinates import SkyCoord, search_around_sky
from astropy.time import Time
from erfa import ErfaWarning

target_epoch = float(sys.argv[1])
radius_arcsec = float(sys.argv[2])
values = np.array([float(v) for v in sys.argv[3:]]).reshape(-1, 7)
files, ra, dec, pmra, pmdec, parallax, epoch = values.T

coords = SkyCoord(
    ra=ra * u.deg,
    dec=dec * u.deg,
    pm_ra_cosdec=pmra * u.mas / u.yr,
    pm_dec=pmdec * u.mas / u.yr,
    distance=(1000.0 / parallax) * u.pc,
    radial_velocity=np.zeros(len(ra)) * u.km / u.s,
    obstime=Time(epoch, format="jyear", scale="tdb"),
    frame="icrs",
)
with warnings.catch_warnings():
    warnings.simplefilter("ignore", ErfaWarning)  # "dubious year" for epochs past the leap-second table
    moved = coords.apply_space_motion(new_obstime=Time(target_epoch, format="jyear", scale="tdb"))
for index, (r, d) in enumerate(zip(moved.ra.deg, moved.dec.deg)):
    print(f"position {index} {r:.12f} {d:.12f}")

first = np.flatnonzero(files == 0)
second = np.flatnonzero(files == 1)
at_epoch = SkyCoord(ra=moved.ra, dec=moved.dec, frame="icrs")
ia, ib, separation, _ = search_around_sky(at_epoch[first], at_epoch[second], radius_arcsec * u.arcsec)
for a, b, s in sorted(zip(first[ia], second[ib], separation.arcsec)):
    print(f"pair {a} {b} {s:.9f}")
