#!/usr/bin/python3
"""Writes tests/data/hodograph_reference.csv: reference flights under quadratic drag in
still air, a = g - c |v| v, for the tests of lob/integrate/hodograph.hpp.

Independent of the hodograph: the equations of motion are integrated in Cartesian form,
    x' = vx,  y' = vy,  vx' = -c |v| vx,  vy' = -g - c |v| vy,
by summing their Taylor series step by step in mpmath (order dps + 12, steps whose last
terms are below 10^-(dps+2), in units of v0/g, v0^2/g and v0). The apex (vy = 0) and the
crossings of the height h (y = h, rising and falling) are roots of the step polynomials
(the dense output), found by bisection and Newton's method; a step is cut at the apex.
(mpmath's odefun was tried first and was seen to lose 1e-13 at 30 digits on a vertical
launch, so the series are summed here with a step control we can see.)
Every launch is solved twice, at 30 and at 36 significant digits, and the script stops
unless the two agree to 1e-26 relative (absolute for values near 0); 25 digits are written.

Inputs are exact decimals: v0, c, g (9.80665, standard gravity) and h are short decimal
strings; the launch inclination theta [rad] is written as the exact decimal expansion of
the double nearest to the elevation in degrees, so that a double (or any wider type)
parses it without rounding (near the vertical the flight is sensitive to theta).
The drag coefficient is c = kappa g / v0^2 rounded to 6 digits, for kappa = c v0^2 / g
from 1e-6 to 1e3; elevations from -80 to +90 deg; landing heights on and above the launch
(for upward launches) and below it, down to a few times the flight's length scale.

Run with Debian's interpreter (the python3 first on PATH has no mpmath):
    /usr/bin/python3 scripts/hodograph_reference.py > tests/data/hodograph_reference.csv
"""
import sys
from decimal import Decimal

from mpmath import mp, mpf, sqrt, cos, sin, pi, nstr

KAPPAS = ["1e-6", "1e-3", "0.1", "1.5", "10", "100", "1000"]
ELEVATIONS = [-80, -30, 0, 10, 35, 45, 60, 80, 89.99, 90]
SPEEDS = {"1e-6": "40", "1e-3": "55", "0.1": "40", "1.5": "40", "10": "25", "100": "60", "1000": "40"}
G = "9.80665"


def theta_text(degrees):
    """Exact decimal of the double nearest to `degrees` converted to radians."""
    mp.dps = 40
    return str(Decimal(float(mpf(degrees) * pi / 180)))


def sig(x, digits):
    """x rounded to `digits` significant digits, as a short decimal string."""
    return nstr(x, digits, min_fixed=-30, max_fixed=30, strip_zeros=True)


class TaylorFlight:
    """The flight in units of v0/g (time), v0^2/g (length) and v0 (speed), where the
    equations become X' = U, Y' = W, U' = -k S U, W' = -1 - k S W with S = sqrt(U^2 + W^2)
    and k = c v0^2 / g. Each step sums the Taylor series of the solution to order `order`
    (coefficients by the usual recurrences of products and of S^2 = U^2 + W^2), with a step
    whose last terms are below 10^-dps: the step's polynomial is the dense output."""

    def __init__(self, k, theta, dps):
        self.k = k
        self.order = dps + 12
        self.tol = mpf(10) ** (-dps - 2)
        self.t = mpf(0)
        self.q = [mpf(0), mpf(0), cos(theta), sin(theta)]  # X, Y, U, W

    def series(self):
        n, k = self.order, self.k
        X, Y, U, W, S = ([mpf(0)] * (n + 1) for _ in range(5))
        X[0], Y[0], U[0], W[0] = self.q
        S[0] = sqrt(U[0] ** 2 + W[0] ** 2)
        for m in range(n):
            if m > 0:
                sq = sum(U[j] * U[m - j] + W[j] * W[m - j] for j in range(m + 1))
                sq -= sum(S[j] * S[m - j] for j in range(1, m))
                S[m] = sq / (2 * S[0])
            su = sum(S[j] * U[m - j] for j in range(m + 1))
            sw = sum(S[j] * W[m - j] for j in range(m + 1))
            X[m + 1] = U[m] / (m + 1)
            Y[m + 1] = W[m] / (m + 1)
            U[m + 1] = -k * su / (m + 1)
            W[m + 1] = (-k * sw - (1 if m == 0 else 0)) / (m + 1)
        return [X, Y, U, W]

    def step(self):
        """One step: returns (h, coefficient lists); the caller advances with advance()."""
        co = self.series()
        n = self.order
        h = None
        for c in co:
            for m in (n - 1, n):
                if c[m] != 0:
                    hm = (self.tol / abs(c[m])) ** (mpf(1) / m)
                    h = hm if h is None else min(h, hm)
        return h / 2, co

    @staticmethod
    def value(c, s):
        r = mpf(0)
        for a in reversed(c):
            r = r * s + a
        return r

    @staticmethod
    def slope(c, s):
        r = mpf(0)
        for m in range(len(c) - 1, 0, -1):
            r = r * s + m * c[m]
        return r

    def root(self, c, target, lo, hi):
        """Root of value(c, s) = target on [lo, hi] (a sign change): bisection, then Newton."""
        flo = self.value(c, lo) - target
        for _ in range(60):
            mid = (lo + hi) / 2
            fm = self.value(c, mid) - target
            if (fm < 0) == (flo < 0):
                lo, flo = mid, fm
            else:
                hi = mid
        s = (lo + hi) / 2
        for _ in range(20):
            d = (self.value(c, s) - target) / self.slope(c, s)
            s -= d
            if abs(d) <= self.tol:
                break
        return s

    def state_at(self, co, s):
        return [self.value(c, s) for c in co]


def solve(v0, theta, c, g, heights, dps):
    """Apex and crossings of the given heights, at `dps` digits."""
    mp.dps = dps + 10
    v0, theta, c, g = mpf(v0), mpf(theta), mpf(c), mpf(g)
    T, L = v0 / g, v0 ** 2 / g
    hs = [mpf(h) for h in heights]
    fl = TaylorFlight(c * v0 ** 2 / g, theta, dps)

    def point(t, q):
        return {"t": t * T, "x": q[0] * L, "y": q[1] * L, "v": sqrt(q[2] ** 2 + q[3] ** 2) * v0,
                "vx": q[2] * v0, "vy": q[3] * v0}

    out = {"apex": point(mpf(0), fl.q) if fl.q[3] <= 0 else None}
    res = {h: {} for h in hs}
    pending = [(h, "rise") for h in hs if h > 0 and fl.q[3] > 0] + [(h, "fall") for h in hs]
    if fl.q[3] <= 0 and mpf(0) in hs:
        res[mpf(0)]["fall"] = point(mpf(0), fl.q)  # a level or downward launch starts there
        pending.remove((mpf(0), "fall"))
    for _ in range(200000):
        if not pending and out["apex"] is not None:
            break
        h, co = fl.step()
        end = fl.state_at(co, h)
        if out["apex"] is None and end[3] <= 0:
            # Stop the step at the apex, so that the height is monotone within every step.
            h = fl.root(co[3], 0, mpf(0), h)
            end = fl.state_at(co, h)
            end[3] = mpf(0)
            out["apex"] = point(fl.t + h, end)
        climbing = out["apex"] is None or (h > 0 and fl.q[3] > 0)
        for item in list(pending):
            hh, part = item
            y0, y1 = fl.q[1] * L, end[1] * L
            rising_now = part == "rise" and climbing and y0 < hh <= y1
            falling_now = part == "fall" and not climbing and y0 > hh >= y1
            if rising_now or falling_now:
                s = fl.root(co[1], hh / L, mpf(0), h)
                res[hh][part] = point(fl.t + s, fl.state_at(co, s))
                pending.remove(item)
            elif part == "rise" and not climbing:
                pending.remove(item)  # above the apex: never crossed on the way up
        fl.t += h
        fl.q = end
    else:
        raise RuntimeError("step budget exhausted")
    out.update(res)
    mp.dps = dps
    return out, hs


def agree(a, b, scale):
    return abs(a - b) <= mpf("1e-26") * max(abs(a), abs(b), scale)


def main():
    cols = ["v0", "theta", "c", "g", "h", "t_apex", "x_apex", "y_apex", "v_apex", "t_rise", "x_rise",
            "v_rise", "t_land", "x_land", "v_land", "phi_land"]
    print("# Reference flights under quadratic drag in still air, a = g - c|v|v (SI units, theta and")
    print("# phi_land in rad, phi_land the path angle at landing, negative downward).")
    print("# Made by scripts/hodograph_reference.py: Cartesian equations of motion integrated with")
    print("# Taylor series in mpmath at 30 and 36 digits (agreeing to 1e-26), apex and height")
    print("# crossings as roots of the step polynomials. *_rise is the rising crossing of h (nan if none);")
    print("# *_land the falling crossing. 25 significant digits.")
    print(",".join(cols))
    sys.stdout.flush()
    for kappa in KAPPAS:
        v0 = SPEEDS[kappa]
        mp.dps = 40
        c = sig(mpf(kappa) * mpf(G) / mpf(v0) ** 2, 6)
        for elev in ELEVATIONS:
            theta = theta_text(elev)
            # length scale of the flight: the shorter of v0^2/g and 1/c
            mp.dps = 40
            scale = min(mpf(v0) ** 2 / mpf(G), 1 / mpf(c))
            probe, _ = solve(v0, theta, c, G, [], 20)
            heights = ["0", sig(-scale / 2, 3), sig(-3 * scale, 3)]
            if probe["apex"]["y"] > 0:
                heights.append(sig(probe["apex"]["y"] * mpf("0.4"), 3))
            lo, hs_lo = solve(v0, theta, c, G, heights, 30)
            hi, hs_hi = solve(v0, theta, c, G, heights, 36)
            mp.dps = 36
            for key in ("t", "x", "y", "v"):
                if not agree(lo["apex"][key], hi["apex"][key], scale):
                    raise RuntimeError(f"apex {key} disagrees for kappa={kappa} elev={elev}")
            for h_text, hl, hh in zip(heights, hs_lo, hs_hi):
                a, b = lo[hl], hi[hh]
                for part in b:
                    for key in ("t", "x", "v"):
                        if not agree(a[part][key], b[part][key], scale):
                            raise RuntimeError(f"{part} {key} disagrees, kappa={kappa} elev={elev} h={h_text}")
                ap = hi["apex"]
                fall = b["fall"]
                rise = b.get("rise")
                phi = mp.atan2(fall["vy"], fall["vx"])
                row = [v0, theta, c, G, h_text] + [nstr(ap[k], 25) for k in ("t", "x", "y", "v")]
                row += [nstr(rise[k], 25) for k in ("t", "x", "v")] if rise else ["nan"] * 3
                row += [nstr(fall[k], 25) for k in ("t", "x", "v")] + [nstr(phi, 25)]
                print(",".join(row))
                sys.stdout.flush()


if __name__ == "__main__":
    main()
