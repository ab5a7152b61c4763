#!/usr/bin/python3
"""Writes tests/data/exact_linear_reference.csv: 50-digit reference flights under linear
drag (rate k >= 0, k = 0 is vacuum) with constant wind, for lob's exact/ tests.

Method (independent of the code under test: no Lambert W, no closed-form crossing time):
the explicit solution of a = g - k (v - w),
    z(t)  = z0 + w_z t + (v_z - w_z) (1 - e^-kt)/k - g (t/k - (1 - e^-kt)/k^2),
    vz(t) = w_z + (v_z - w_z) e^-kt - g (1 - e^-kt)/k,
and the same per horizontal axis without g (for k = 0 the vacuum polynomials), is
evaluated in plain form at a working precision of 130 (and again 160) digits, enough to
absorb its cancellation for k down to 1e-12. The apex is the root of vz(t) = 0 and the
landing the root of z(t) = h after the apex, both by bisection on a bracket found by
doubling; the rising crossing of h (when 0 < h - z0 < apex rise) is the root of z(t) = h
before the apex. Every case is solved at both working precisions and the script stops
unless they agree to 1e-45 relative; values are printed with 40 significant digits.

Inputs are IEEE doubles (printed with repr, so they parse back to the same double); the
references are for those exact inputs. Gravity is (0, 0, -g), g the double nearest
9.80665. Cases: a grid over k = 0, 1e-12 .. 1e3 1/s, speeds 0.01 .. 2000 m/s, elevations
-89 .. 90 degrees (vertical and grazing included), landing below, level with and above
the launch, wind off and on; plus seeded random cases over the same ranges.

Run with Debian's interpreter (the python3 first on PATH has no mpmath):
    /usr/bin/python3 scripts/exact_reference.py > tests/data/exact_linear_reference.csv

With --check-series the script instead checks the branch-point series coefficients in
include/lob/detail/math.hpp (branch_coefficients): it derives them again by Lagrange
inversion in exact rational arithmetic (u(p) solves -log1pmx(-u) = p^2/2), compares them
to the header's literals, and compares p * sum_n c_n p^n with mpmath's lambertw,
u = 1 + W(-exp(-p^2/2 - 1)), for |p| <= 1/2 on both branches. It exits non-zero on a
mismatch.
"""
import os
import re
from fractions import Fraction
import random
import sys

import mpmath
from mpmath import mp, mpf

mp.dps = 50
G = 9.80665

COLUMNS = ["id", "k", "g", "z0", "vx", "vy", "vz", "wx", "wy", "wz", "h",
           "landing_time", "range", "apex_height", "landing_speed", "rising_time"]


def motion(c, t):
    """Position offset (x, y, z - z0) and velocity at time t, explicit plain form."""
    k, g = mpf(c["k"]), mpf(c["g"])
    v = [mpf(c["vx"]), mpf(c["vy"]), mpf(c["vz"])]
    w = [mpf(c["wx"]), mpf(c["wy"]), mpf(c["wz"])]
    acc = [mpf(0), mpf(0), -g]
    pos, vel = [], []
    for i in range(3):
        if k == 0:
            pos.append(v[i] * t + acc[i] * t * t / 2)
            vel.append(v[i] + acc[i] * t)
        else:
            e = mpmath.exp(-k * t)
            one = 1 - e
            # a = acc - k (v - w): terminal velocity w + acc/k
            pos.append(w[i] * t + (v[i] - w[i]) * one / k + acc[i] * (t / k - one / (k * k)))
            vel.append(w[i] + (v[i] - w[i]) * e + acc[i] * one / k)
    return pos, vel


def bisect(f, lo, hi, rel=mpf(10) ** -(mp.dps - 5)):
    """Root of f on [lo, hi] where f(lo) and f(hi) differ in sign (f(lo) >= 0 > f(hi) or
    the reverse), by plain bisection to a relative width rel."""
    flo = f(lo)
    for _ in range(2000):
        mid = (lo + hi) / 2
        fm = f(mid)
        if (fm >= 0) == (flo >= 0):
            lo, flo = mid, fm
        else:
            hi = mid
        if hi - lo <= rel * abs(hi):
            break
    return (lo + hi) / 2


def solve(c):
    z0, h = mpf(c["z0"]), mpf(c["h"])
    vz0 = mpf(c["vz"])
    vzt = lambda t: motion(c, t)[1][2]
    rise = lambda t: motion(c, t)[0][2] - (h - z0)
    # Apex: vz(t) = 0 (only for an upward launch).
    if vz0 > 0:
        hi = mpf(1)
        while vzt(hi) > 0:
            hi *= 2
        t_apex = bisect(vzt, mpf(0), hi)
        apex = z0 + motion(c, t_apex)[0][2]
    else:
        t_apex, apex = mpf(0), z0
    # Landing: z(t) = h after the apex.
    lo = t_apex
    hi = t_apex + 1
    while rise(hi) >= 0:
        lo = hi
        hi = t_apex + 2 * (hi - t_apex)
    t_land = bisect(rise, lo, hi)
    pos, vel = motion(c, t_land)
    rng = mpmath.sqrt(pos[0] ** 2 + pos[1] ** 2)
    speed = mpmath.sqrt(sum(x * x for x in vel))
    rising = None
    if vz0 > 0 and h - z0 > 0:
        rising = bisect(rise, mpf(0), t_apex)
    return [t_land, rng, apex, speed, rising]


def solve_checked(c):
    results = []
    for dps in (130, 160):
        with mp.workdps(dps):
            results.append(solve(c))
    a, b = results
    for x, y in zip(a, b):
        if x is None:
            continue
        if abs(x - y) > mpf(10) ** -45 * abs(y) and abs(x - y) > mpf(10) ** -60:
            sys.exit("case %s: precisions disagree: %s vs %s" % (c["id"], x, y))
    return b


def velocity(speed, elevation_deg):
    """Double components of a launch velocity in the x-z plane (rounded from 50 digits);
    exactly vertical at +-90 degrees."""
    if abs(elevation_deg) == 90:
        return 0.0, 0.0, float(speed if elevation_deg > 0 else -speed)
    el = mpmath.radians(mpf(elevation_deg))
    return float(speed * mpmath.cos(el)), 0.0, float(speed * mpmath.sin(el))


def apex_rise(c):
    """Apex rise above the launch (for choosing landing heights), at 130 digits."""
    if c["vz"] <= 0:
        return 0.0
    with mp.workdps(130):
        cc = dict(c, h=c["z0"])
        return float(solve(cc)[2] - mpf(c["z0"]))


def make_case(rng, k, speed, elevation, z0, landing, wind, cid):
    """landing: ('level', _), ('below', drop) or ('above', fraction of the apex rise)."""
    vx, vy, vz = velocity(speed, elevation)
    wx, wy, wz = wind
    c = dict(id=cid, k=k, g=G, z0=z0, vx=vx, vy=vy, vz=vz, wx=wx, wy=wy, wz=wz, h=z0)
    kind, amount = landing
    if kind == "level" and vz <= 0:
        kind, amount = "below", 1.0
    if kind == "above":
        top = apex_rise(c)
        if not top > 0:
            kind, amount = "below", 1.0
        else:
            dh = amount * top
    if kind == "below":
        dh = -amount
    if kind == "level":
        dh = 0.0
    h = z0 + dh
    # Keep h - z0 exact in double, as the library forms it: else land from z0 = 0.
    if mpf(h) - mpf(z0) != mpf(h - z0) or (h - z0 == 0 and kind != "level"):
        c["z0"] = 0.0
        h = dh
    c["h"] = h
    return c


def cases():
    rng = random.Random(20261201)
    out = []
    ks = [0.0, 1e-12, 1e-9, 1e-6, 1e-3, 0.1, 1.0, 10.0, 100.0, 1000.0]
    speeds = [0.01, 1.0, 30.0, 300.0, 2000.0]
    elevations = [-89.0, -30.0, 0.0, 1e-3, 30.0, 45.0, 75.0, 89.999, 90.0]
    landings = [("level", 0), ("below", 10.0), ("above", 0.5), ("below", 1e-3), ("above", 0.9)]
    winds = [(0.0, 0.0, 0.0), (7.5, -3.25, 0.5)]
    n = 0
    for ik, k in enumerate(ks):
        for js, speed in enumerate(speeds):
            for je, el in enumerate(elevations):
                landing = landings[(ik + js + je) % len(landings)]
                wind = winds[(ik + 2 * js + je) % 2]
                if k * wind[2] > 0.5 * G:
                    wind = winds[0]
                out.append(make_case(rng, k, speed, el, 0.0, landing, wind, "g%d" % n))
                n += 1
    for i in range(600):
        k = 0.0 if rng.random() < 0.08 else 10 ** rng.uniform(-12, 3)
        speed = 10 ** rng.uniform(-2, 3.30103)
        el = rng.choice([90.0, 89.9999, 1e-4, -89.0]) if rng.random() < 0.1 else rng.uniform(-89, 90)
        z0 = 0.0 if rng.random() < 0.5 else 10 ** rng.uniform(-1, 3)
        r = rng.random()
        if r < 0.3:
            landing = ("level", 0)
        elif r < 0.7:
            landing = ("below", 10 ** rng.uniform(-3, 4))
        else:
            landing = ("above", rng.uniform(0.05, 0.9))
        wind = (0.0, 0.0, 0.0)
        if rng.random() < 0.5:
            wind = (rng.uniform(-15, 15), rng.uniform(-15, 15), rng.uniform(-2, 2))
            if k * wind[2] > 0.5 * G:
                wind = (wind[0], wind[1], 0.0)
        out.append(make_case(rng, k, speed, el, z0, landing, wind, "r%d" % i))
    return out


def series_coefficients(n):
    """c_0 .. c_{n-1} of u(p)/p by Lagrange inversion, exactly."""
    m = n + 2
    # f(u) = u g(u), g = sqrt(1 + sum_{j>=1} 2 u^j/(j + 2)); u(p) = sum_n (1/n) [u^(n-1)] g^-n p^n
    a = [Fraction(1)] + [Fraction(2, j + 2) for j in range(1, m)]
    g = [Fraction(0)] * m
    g[0] = Fraction(1)
    for j in range(1, m):
        g[j] = (a[j] - sum(g[i] * g[j - i] for i in range(1, j))) / 2
    h = [Fraction(0)] * m
    h[0] = Fraction(1)
    for j in range(1, m):
        h[j] = -sum(g[i] * h[j - i] for i in range(1, j + 1))
    power = [Fraction(1)] + [Fraction(0)] * (m - 1)
    out = []
    for k in range(1, n + 1):
        power = [sum(power[i] * h[j - i] for i in range(j + 1)) for j in range(m)]
        out.append(power[k - 1] / k)
    return out


def check_series():
    here = os.path.dirname(os.path.abspath(__file__))
    text = open(os.path.join(here, "..", "include", "lob", "detail", "math.hpp")).read()
    block = text[text.index("branch_coefficients[34] = {"):]
    block = block[:block.index("};")]
    literals = [mpf(x) for x in re.findall(r"T\(([-0-9.e]+)L\)", block)]
    exact = series_coefficients(len(literals))
    worst = mpf(0)
    for lit, c in zip(literals, exact):
        value = mpf(c.numerator) / c.denominator
        worst = max(worst, abs(lit - value) / abs(value))
    print("coefficients: %d, worst relative difference from exact %s" % (len(literals), mpmath.nstr(worst, 3)))
    bad = worst > mpf(10) ** -22
    worst = mpf(0)
    for i in range(-50, 51):
        p = mpf(i) / 100
        if p == 0:
            continue
        z = -mpmath.exp(-p * p / 2 - 1)
        u = 1 + mpmath.lambertw(z, 0 if p > 0 else -1).real
        s_ = p * sum(c * p ** n for n, c in enumerate(literals))
        worst = max(worst, abs(s_ - u) / abs(u))
    print("series vs mpmath lambertw for |p| <= 1/2: worst relative difference %s" % mpmath.nstr(worst, 3))
    bad = bad or worst > mpf(10) ** -20
    sys.exit(1 if bad else 0)


def main():
    if "--check-series" in sys.argv:
        check_series()
    all_cases = cases()
    print("# exact_linear_reference.csv: 50-digit reference flights under linear drag.")
    print("# Made by scripts/exact_reference.py (mpmath %s, seed 20261201): explicit z(t)," % mpmath.__version__)
    print("# roots by bisection at 130 and 160 working digits (agreeing to 1e-45); no Lambert W.")
    print("# Inputs are doubles (repr); gravity (0, 0, -g); h and apex_height absolute [m];")
    print("# times [s], range [m] horizontal, landing_speed [m/s]; rising_time '-' if none.")
    print(",".join(COLUMNS))
    for c in all_cases:
        t_land, rng_, apex, speed, rising = solve_checked(c)
        row = [c["id"]] + [repr(float(c[n])) for n in COLUMNS[1:11]]
        row += [mpmath.nstr(x, 40) for x in (t_land, rng_, apex, speed)]
        row.append(mpmath.nstr(rising, 40) if rising is not None else "-")
        print(",".join(row))


if __name__ == "__main__":
    main()
