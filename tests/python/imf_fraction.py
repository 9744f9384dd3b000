"""Fraction of an IMF between two masses, by numerical integration with scipy.integrate.quad
(Debian package python3-scipy): an independent check of the analytic integrals in
census/InitialMassFunction.cpp. The IMF forms are written here from the papers:
  kroupa:   Kroupa 2001, MNRAS 322, 231, eq. 2 (dN/dm ∝ m^-alpha_i, continuous at the breaks)
  chabrier: Chabrier 2003, PASP 115, 763, Table 1 single objects (from memory): dN/dlog10 m ∝
            exp(-(log10 m - log10 mc)^2 / (2 sigma^2)) for m <= join, ∝ m^-x above, continuous.
Run with /usr/bin/python3:
  imf_fraction.py kroupa   MMIN MMAX ALPHA0 ALPHA1 ALPHA2 BREAK1 BREAK2 LOW HIGH
  imf_fraction.py chabrier MMIN MMAX MC SIGMA JOIN X LOW HIGH
"""
import math
import sys

from scipy.integrate import quad


def kroupa(alpha0, alpha1, alpha2, break1, break2):
    def xi(m):
        if m < break1:
            return (m / break1) ** -alpha0
        if m < break2:
            return (m / break1) ** -alpha1
        return (break2 / break1) ** -alpha1 * (m / break2) ** -alpha2
    return xi, [break1, break2]


def chabrier(mc, sigma, join, x):
    def per_log_mass(m):
        return math.exp(-((math.log10(m) - math.log10(mc)) ** 2) / (2.0 * sigma**2))

    def xi(m):  # dN/dm = dN/dlog10 m / (m ln 10)
        if m <= join:
            return per_log_mass(m) / (m * math.log(10.0))
        return per_log_mass(join) * (m / join) ** -x / (m * math.log(10.0))
    return xi, [join]


def integral(xi, low, high, breaks):
    points = [low] + [b for b in breaks if low < b < high] + [high]
    return sum(quad(xi, a, b, epsabs=0.0, epsrel=1e-11, limit=200)[0] for a, b in zip(points, points[1:]))


def main():
    family = sys.argv[1]
    numbers = [float(v) for v in sys.argv[2:]]
    mmin, mmax = numbers[0], numbers[1]
    if family == "kroupa":
        xi, breaks = kroupa(*numbers[2:7])
        low, high = numbers[7], numbers[8]
    else:
        xi, breaks = chabrier(*numbers[2:6])
        low, high = numbers[6], numbers[7]
    low, high = max(low, mmin), min(high, mmax)
    print("%.15g" % (integral(xi, low, high, breaks) / integral(xi, mmin, mmax, breaks)))


if __name__ == "__main__":
    main()
