#!/usr/bin/python3
"""Writes tests/data/physics_atmosphere_reference.csv: pressure and density of the
U.S. Standard Atmosphere 1976 (and of offset hot/cold days) from a formulation different
from lob's: the hydrostatic equation dP/P = -(g0 M0 / R*) dH / T(H) integrated numerically
(mpmath tanh-sinh quadrature, split at the layer bases) instead of the layer formulas.

Run with Debian's interpreter, which has mpmath:  /usr/bin/python3 scripts/physics_atmosphere_reference.py
"""
import os
import mpmath as mp

mp.mp.dps = 40
R = mp.mpf("8.31432")          # J/(mol K), U.S. Standard Atmosphere 1976
M0 = mp.mpf("28.9644e-3")      # kg/mol
G0 = mp.mpf("9.80665")         # m/s^2
P0 = mp.mpf(101325)
BASES = [0, 11000, 20000, 32000, 47000, 51000, 71000, 84852]
LAPSE = [mp.mpf(x) / 1000 for x in ("-6.5", "0", "1.0", "2.8", "0", "-2.8", "-2.0")]


def temperature(h, offset):
    """Molecular-scale temperature at geopotential altitude h [m'] plus a day offset [K]."""
    t = mp.mpf("288.15")
    for i in range(7):
        top = BASES[i + 1]
        if h <= top or i == 6:
            return t + LAPSE[i] * (h - BASES[i]) + offset
        t += LAPSE[i] * (top - BASES[i])
    raise AssertionError


def pressure(h, offset):
    h = mp.mpf(h)
    points = [mp.mpf(0)] + [mp.mpf(b) for b in BASES[1:] if 0 < b < h] + [h]
    if h < 0:
        points = [mp.mpf(0), h]
    integral = mp.quad(lambda x: 1 / temperature(x, offset), points)
    return P0 * mp.exp(-G0 * M0 / R * integral)


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    out = os.path.join(here, "..", "tests", "data", "physics_atmosphere_reference.csv")
    rows = []
    for offset in ("0", "-25", "15.5", "40"):
        for h in (-5000, -1500, 0, 750, 3000, 8000, 11000, 15000, 20000, 26500, 32000, 40000,
                  47000, 50000, 60000, 71000, 80000, 84852):
            off = mp.mpf(offset)
            p = pressure(h, off)
            t = temperature(mp.mpf(h), off)
            rho = p * M0 / (R * t)
            rows.append((h, offset, mp.nstr(t, 30), mp.nstr(p, 30), mp.nstr(rho, 30)))
    with open(out, "w") as f:
        f.write("# Made by scripts/physics_atmosphere_reference.py (mpmath %s, %d digits): U.S. Standard\n"
                % (mp.__version__, mp.mp.dps))
        f.write("# Atmosphere 1976 by numerical quadrature of the hydrostatic equation, day offset added\n")
        f.write("# to the temperature at every altitude, sea-level pressure 101325 Pa.\n")
        f.write("# geopotential_altitude_m,temperature_offset_K,temperature_K,pressure_Pa,density_kg_m3\n")
        for r in rows:
            f.write(",".join(str(x) for x in r) + "\n")


if __name__ == "__main__":
    main()
