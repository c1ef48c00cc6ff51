#!/usr/bin/env python3
"""Write the reference trap-frequency waveforms used by qutip_reference.py.

Pure standard-library Python (math only), deterministic: running it again
rewrites byte-identical CSV files.  Output goes to waveforms/ beside this file.

Format: an optional '#' description line, a header line 't,omega' (rad/s) or
't,omega2' ((rad/s)^2), then rows 't,value' with t in seconds from 0 and the
numbers written with Python repr (shortest string that round-trips the double).
"""

import math
import os

TWO_PI = 2.0 * math.pi
HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "waveforms")


def write_csv(name, description, column, rows):
    path = os.path.join(OUT, name)
    with open(path, "w", newline="\n") as fh:
        fh.write("# " + description + "\n")
        fh.write("t," + column + "\n")
        for t, v in rows:
            fh.write(repr(float(t)) + "," + repr(float(v)) + "\n")
    print("wrote", os.path.relpath(path, HERE), "(%d rows)" % len(rows))


def expand_smooth():
    """omega(s) = wi + (wf - wi)(s - sin(2 pi s)/(2 pi)), s = t/T, 201 rows."""
    wi = TWO_PI * 100e3
    wf = TWO_PI * 40e3
    T = 12e-6
    n = 201
    rows = []
    for k in range(n):
        s = k / (n - 1)
        t = k * T / (n - 1)
        w = wi + (wf - wi) * (s - math.sin(TWO_PI * s) / TWO_PI)
        rows.append((t, w))
    # pin the end points exactly
    rows[0] = (0.0, wi)
    rows[-1] = (T, wf)
    write_csv(
        "expand_smooth.csv",
        "smooth expansion 100 kHz -> 40 kHz in 12 us, omega = wi + (wf-wi)(s - sin(2 pi s)/(2 pi)); read omega by linear interpolation",
        "omega",
        rows,
    )


def inverted_depth():
    """Find s* and a = A/w1^2 with min_s [1 + 8 s - a sin^2(pi s)] = -1/2.

    omega2/w1^2 = (1 - s) + 9 s - a sin^2(pi s) = 1 + 8 s - a sin^2(pi s)
    (w2 = 3 w1).  At the minimum f' = 0 gives a = 8/(pi sin(2 pi s)), and then
    f = -1/2 becomes g(s) = 3/2 + 8 s - (4/pi) tan(pi s) = 0, whose root on
    (1/4, 1/2) is unique (g decreases there from g(1/4) > 0 to -infinity) and
    is the only interior minimum of f.  Plain bisection: deterministic.
    """
    lo, hi = 0.25, 0.5 - 1e-12

    def g(s):
        return 1.5 + 8.0 * s - (4.0 / math.pi) * math.tan(math.pi * s)

    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if g(mid) > 0.0:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 0.0:
            break
    s_star = 0.5 * (lo + hi)
    a = 8.0 / (math.pi * math.sin(TWO_PI * s_star))
    return s_star, a


def compress_inverted():
    """omega2(s) = (1-s) w1^2 + s w2^2 - A sin^2(pi s), 161 rows, min omega2 = -w1^2/2."""
    w1 = TWO_PI * 50e3
    w2 = TWO_PI * 150e3
    T = 4e-6
    n = 161
    s_star, a = inverted_depth()
    A = a * w1 * w1
    rows = []
    for k in range(n):
        s = k / (n - 1)
        t = k * T / (n - 1)
        v = (1.0 - s) * w1 * w1 + s * w2 * w2 - A * math.sin(math.pi * s) ** 2
        rows.append((t, v))
    rows[0] = (0.0, w1 * w1)
    rows[-1] = (T, w2 * w2)
    write_csv(
        "compress_inverted.csv",
        "compression 50 kHz -> 150 kHz in 4 us through an inverted stretch, omega2 = (1-s) w1^2 + s w2^2 - A sin^2(pi s), A = %r (rad/s)^2 so min omega2 = -w1^2/2 at s = %r; read omega2 by linear interpolation"
        % (A, s_star),
        "omega2",
        rows,
    )


def hold_steps():
    """60 samples every 0.25 us, left sample-and-hold; last row = end value 60 kHz."""
    rows = []
    n = 60
    for k in range(n):
        t = k * 0.25e-6
        w = TWO_PI * (80e3 + 40e3 * math.sin(0.37 * k) * math.exp(-k / 40.0))
        rows.append((t, w))
    rows[-1] = (rows[-1][0], TWO_PI * 60e3)
    write_csv(
        "hold_steps.csv",
        "sample-and-hold steps, omega_k = 2 pi (80 kHz + 40 kHz sin(0.37 k) exp(-k/40)), t_k = k 0.25 us; row k held on [t_k, t_k+1); last row (60 kHz) is the end value, held for zero time",
        "omega",
        rows,
    )


def main():
    os.makedirs(OUT, exist_ok=True)
    expand_smooth()
    compress_inverted()
    hold_steps()


if __name__ == "__main__":
    main()
