"""Reference membership probabilities by direct numerical integration with scipy.integrate.quad.

P(r < R | plx) = int_{1000/R}^inf p(t) N(plx; t, s) dt / int_{1000/rmax}^inf p(t) N(plx; t, s) dt,
with p(t) = t^-4 (constant space density) or 1 (flat in parallax); Bailer-Jones 2015, PASP 127, 994.
Prints one line per grid point: prior parallax_mas error_mas radius_pc outer_pc probability.
"""
import math
import sys

from scipy import integrate

OUTER_PC = 200.0


def probability(plx, err, radius, prior):
    def density(t):
        weight = t ** -4 if prior == "constant" else 1.0
        return weight * math.exp(-0.5 * ((plx - t) / err) ** 2)

    lo = 1000.0 / OUTER_PC
    hi = max(plx + 12 * err, lo + 12 * err)
    edge = 1000.0 / radius
    points = sorted({p for p in (plx, edge, lo) if lo <= p <= hi})
    total, _ = integrate.quad(density, lo, hi, points=points, limit=400, epsabs=0, epsrel=1e-10)
    if edge >= hi:
        return 0.0
    inside, _ = integrate.quad(density, max(edge, lo), hi, points=[p for p in points if p > edge] or None,
                               limit=400, epsabs=0, epsrel=1e-10)
    return inside / total


def main():
    for prior in ("constant", "flat"):
        for plx in (150.0, 100.0, 60.0, 40.0, 10.0, 4.0):
            for err in (0.05, 1.0, 5.0, 20.0):
                for radius in (10.0, 20.0, 50.0):
                    print(prior, plx, err, radius, OUTER_PC, repr(probability(plx, err, radius, prior)))
    sys.stdout.flush()


if __name__ == "__main__":
    main()
