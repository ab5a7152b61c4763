#!/usr/bin/python3
"""Writes tests/data/integrate_quadratic_reference.csv: high-precision reference flights
under quadratic and linear-plus-quadratic drag with constant wind, for lob's integrate
tests.

Method: the equations of motion in Cartesian form,
    x' = v,   v' = g - (k + c |v - w|) (v - w),   g = (0, 0, -g),
are solved with mpmath's odefun (a Taylor-series method that keeps the working precision)
at 40 significant digits; the apex (vz = 0) and the landing (z = landing height, falling)
are located by bracketing and mpmath's findroot (Anderson's method) on the same solution.
Every case is solved twice, at 40 and at 50 digits, and the script stops unless the two
agree to 1e-28 relative: the printed values carry 25 significant digits.

Run with Debian's interpreter (the python3 first on PATH has no mpmath):
    /usr/bin/python3 scripts/integrate_reference.py > tests/data/integrate_quadratic_reference.csv
"""
import sys

import mpmath
from mpmath import mp, mpf

# The cases: invented launches covering small to large drag, flat to steep, raised and
# lowered landing planes, head-, tail-, cross- and updraft wind. Inputs are decimal strings
# (exact in the script; the C++ tests parse them at full precision of each type).
# name, k [1/s], c [1/m], x0, y0, z0 [m], speed [m/s], elevation [deg], azimuth [deg],
# wind x, y, z [m/s], landing height [m]
CASES = [
    ("ball_vt33", "0", "g/1089", "0", "0", "0", "40", "35", "0", "0", "0", "0", "0"),
    ("light_drag_flat", "0", "0.001", "0", "0", "0", "30", "10", "0", "0", "0", "0", "0"),
    ("light_drag_steep", "0", "0.002", "0", "0", "1.5", "25", "70", "30", "0", "0", "0", "0"),
    ("medium_drag", "0", "0.01", "0", "0", "0", "50", "40", "0", "0", "0", "0", "0"),
    ("heavy_drag", "0", "0.2", "0", "0", "2", "60", "45", "0", "0", "0", "0", "0"),
    ("very_heavy_drag", "0", "1.5", "0", "0", "0", "20", "60", "0", "0", "0", "0", "0"),
    ("fast_low", "0", "0.005", "0", "0", "1", "80", "5", "0", "0", "0", "0", "0"),
    ("near_vertical", "0", "0.02", "0", "0", "0", "30", "88", "0", "0", "0", "0", "0"),
    ("downhill", "0", "0.01", "0", "0", "20", "15", "-10", "0", "0", "0", "0", "-5"),
    ("uphill", "0", "0.004", "0", "0", "0", "35", "50", "0", "0", "0", "0", "4"),
    ("crosswind", "0", "0.01", "0", "0", "0", "40", "35", "0", "0", "6", "0", "0"),
    ("headwind", "0", "0.01", "0", "0", "0", "40", "35", "0", "-8", "0", "0", "0"),
    ("tailwind_3d", "0", "0.008", "3", "-2", "1", "33", "28", "45", "4", "3", "0", "0"),
    ("gust_updraft", "0", "0.01", "0", "0", "0", "25", "45", "0", "2", "-5", "1", "0"),
    ("downdraft", "0", "0.03", "0", "0", "10", "12", "20", "-60", "-1", "1", "-2", "0"),
    ("lin_quad_mild", "0.05", "0.004", "0", "0", "0", "35", "40", "0", "0", "0", "0", "0"),
    ("lin_quad_strong", "0.8", "0.02", "0", "0", "2", "45", "55", "20", "0", "3", "0", "0"),
    ("lin_quad_wind", "0.2", "0.01", "0", "0", "0", "30", "30", "0", "-3", "4", "0.5", "0"),
]


def value(text, g):
    """A decimal string, or the one symbolic entry g/1089 (terminal speed 33 m/s)."""
    if text == "g/1089":
        return g / 1089
    return mpf(text)


def solve(case, digits):
    mp.dps = digits
    g = mpf(980665) / 100000  # standard gravity, CGPM 1901
    name, k, c, x0, y0, z0, speed, elev, azim, wx, wy, wz, h = case
    k, c = value(k, g), value(c, g)
    speed, elev, azim = mpf(speed), mpmath.radians(mpf(elev)), mpmath.radians(mpf(azim))
    w = [mpf(wx), mpf(wy), mpf(wz)]
    h = mpf(h)
    v = [speed * mpmath.cos(elev) * mpmath.cos(azim), speed * mpmath.cos(elev) * mpmath.sin(azim),
         speed * mpmath.sin(elev)]
    start = [mpf(x0), mpf(y0), mpf(z0)] + v

    def rhs(t, y):
        u = [y[3] - w[0], y[4] - w[1], y[5] - w[2]]
        f = k + c * mpmath.sqrt(u[0] ** 2 + u[1] ** 2 + u[2] ** 2)
        return [y[3], y[4], y[5], -f * u[0], -f * u[1], -f * u[2] - g]

    sol = mpmath.odefun(rhs, 0, start)

    def bracket(fn, t_from):
        # Walk forward in steps of 1/20 s until fn changes sign from > 0 to <= 0.
        step = mpf(1) / 20
        a = t_from
        fa = fn(a)
        for _ in range(100000):
            b = a + step
            fb = fn(b)
            if fa > 0 and fb <= 0:
                return a, b
            a, fa = b, fb
        raise RuntimeError("no sign change for " + name)

    vz = lambda t: sol(t)[5]
    t_apex = mpf(0)
    if vz(mpf(0)) > 0:
        a, b = bracket(vz, mpf(0))
        t_apex = mpmath.findroot(vz, (a, b), solver="anderson")
    z_apex = sol(t_apex)[2]
    above = lambda t: sol(t)[2] - h
    a, b = bracket(above, t_apex)
    t_land = mpmath.findroot(above, (a, b), solver="anderson")
    land = sol(t_land)
    range_ = mpmath.sqrt((land[0] - start[0]) ** 2 + (land[1] - start[1]) ** 2)
    return [k, c, t_apex, z_apex, t_land, land[0], land[1], land[3], land[4], land[5], range_]


def main():
    print("# lob integrate reference: quadratic and linear+quadratic drag with constant wind.")
    print("# Made by scripts/integrate_reference.py (mpmath %s odefun Taylor method at 40 digits," % mpmath.__version__)
    print("# apex and landing by findroot; every row agrees with a 50-digit solve to 1e-28).")
    print("# gravity (0, 0, -9.80665) m/s^2; drag a = -(k + c |v - w|) (v - w); angles in degrees.")
    print("# inputs: name,k,c,x0,y0,z0,speed,elevation,azimuth,wind_x,wind_y,wind_z,landing_height")
    print("# outputs: k_value,c_value,apex_time,apex_height,landing_time,landing_x,landing_y,"
          "landing_vx,landing_vy,landing_vz,range")
    print("name,k,c,x0,y0,z0,speed,elevation,azimuth,wind_x,wind_y,wind_z,landing_height,"
          "k_value,c_value,apex_time,apex_height,landing_time,landing_x,landing_y,landing_vx,"
          "landing_vy,landing_vz,range")
    for case in CASES:
        lo = solve(case, 40)
        hi = solve(case, 50)
        mp.dps = 50
        for a, b in zip(lo, hi):
            scale = max(abs(b), mpf(1))
            if abs(a - b) > mpf("1e-28") * scale:
                sys.exit("precision check failed for %s: %s vs %s" % (case[0], a, b))
        mp.dps = 40
        print(",".join(list(case) + [mpmath.nstr(x, 25) for x in hi]))


if __name__ == "__main__":
    main()
