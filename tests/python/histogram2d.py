"""Counts per cell of a 2-D histogram with NumPy's histogram2d (Debian package python3-numpy, which
python3-astropy depends on): the independent reference for reports/DensityGrid.cpp. Points are read
from a text file, one "x y" pair a line ("nan" allowed); NumPy drops points outside the range and NaN.
Run with /usr/bin/python3:
  histogram2d.py POINTS NX XMIN XMAX NY YMIN YMAX -> the counts, x-major (cell (ix, iy) at ix * NY + iy),
                                                     one a line
"""
import sys

import numpy as np

path, nx, x_min, x_max, ny, y_min, y_max = sys.argv[1:8]
points = np.loadtxt(path, ndmin=2)
counts, _, _ = np.histogram2d(points[:, 0], points[:, 1], bins=[int(nx), int(ny)],
                              range=[[float(x_min), float(x_max)], [float(y_min), float(y_max)]])
for count in counts.ravel():  # C order: the last axis (y) fastest
    print(int(count))
