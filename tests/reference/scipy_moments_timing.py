#!/usr/bin/env python3
"""Speed and agreement comparison: second-moment ODEs (SciPy) against the
QuTiP density-matrix reference, for the three reference ramps (and, untimed
against QuTiP, the Otto cycle of qutip_reference.json).

Moment equations (m = 1), valid for any sign of omega^2:
    dX/dt = 2 D,   dY/dt = -2 omega^2 D,   dD/dt = Y - omega^2 X
with X = <Q^2>, Y = <P^2>, D = <(QP+PQ)/2>; a bath stroke at frequency w with
rate G and occupation nbar adds -G (X - (nbar+1/2) hbar/w), -G (Y - (nbar+1/2)
hbar w), -G D.  Integrated here in scaled units (hbar = 1, time in 1/omega_i)
with scipy.integrate.solve_ivp, DOP853, rtol = 1e-10, one call per waveform
segment (the waveforms have kinks or jumps at the rows).

Not run in CI.  Usage:  python scipy_moments_timing.py [--runs 5] [--qutip-runs 3]
"""

import argparse
import json
import os
import statistics
import sys
import time

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")  # single core, as in qutip_reference.py
os.environ.setdefault("OMP_NUM_THREADS", "1")

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import numpy as np  # noqa: E402
from scipy.integrate import solve_ivp  # noqa: E402

import qutip_reference as R  # noqa: E402

RTOL = 1e-10
ATOL = 1e-16  # scaled moments are O(1)


def omega2_scaled(wf, unit):
    """Return a list of (tau0, tau1, f) with f(tau) = omega^2/unit^2 on each segment,
    tau = t * unit local to the segment start."""
    segs = []
    for t0, t1, v0, v1 in wf.segments():
        d = (t1 - t0) * unit
        if wf.reading == "hold":
            u = (v0 * v0 if wf.column == "omega" else v0) / unit**2
            segs.append((d, lambda s, u=u: u))
        elif wf.column == "omega":
            a, b = v0 / unit, (v1 - v0) / unit / d
            segs.append((d, lambda s, a=a, b=b: (a + b * s) ** 2))
        else:
            a, b = v0 / unit**2, (v1 - v0) / unit**2 / d
            segs.append((d, lambda s, a=a, b=b: a + b * s))
    return segs


def moments_ramp(segs, y0, rtol=RTOL, atol=ATOL):
    y = np.array(y0, dtype=float)
    for d, f in segs:
        def rhs(s, v, f=f):
            u = f(s)
            return [2.0 * v[2], -2.0 * u * v[2], v[1] - u * v[0]]
        sol = solve_ivp(rhs, (0.0, d), y, method="DOP853", rtol=rtol, atol=atol)
        y = sol.y[:, -1]
    return y


def husimi_q(segs, wf_scaled, rtol=1e-13):
    """Q* from the fundamental solutions (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)), omega_i = 1."""
    y = np.array([0.0, 1.0, 1.0, 0.0])  # Xs, Xs', Ys, Ys'
    for d, f in segs:
        def rhs(s, v, f=f):
            u = f(s)
            return [v[1], -u * v[0], v[3], -u * v[2]]
        y = solve_ivp(rhs, (0.0, d), y, method="DOP853", rtol=rtol, atol=1e-16).y[:, -1]
    xs, dxs, ys, dys = y
    w2 = wf_scaled**2
    return ((w2 * xs * xs + dxs * dxs) + (w2 * ys * ys + dys * dys)) / (2.0 * wf_scaled)


def hlc_from_moments(y, wfs):
    x, yy, d = y
    return np.array([0.5 * (yy + wfs * wfs * x), 0.5 * (yy - wfs * wfs * x), wfs * d])


def ramp_rows(runs, qutip_runs):
    rows = []
    for name, csv, reading, nbar, n, factor in R.RAMP_CASES:
        wf = R.Waveform(os.path.join(HERE, csv), reading)
        wi, wfin = wf.omega_initial, wf.omega_final
        segs = omega2_scaled(wf, wi)
        y0 = [nbar + 0.5, nbar + 0.5, 0.0]  # thermal: X wi/hbar = Y/(hbar wi) = nbar + 1/2
        times = []
        for _ in range(runs):
            t0 = time.perf_counter()
            y = moments_ramp(segs, y0)
            times.append(time.perf_counter() - t0)
        y_tight = moments_ramp(segs, y0, rtol=1e-13, atol=1e-18)
        wfs = wfin / wi
        hlc = hlc_from_moments(y, wfs)
        hlc_tight = hlc_from_moments(y_tight, wfs)
        ratio = hlc[0] / (wfs * (nbar + 0.5))
        qstar = husimi_q(segs, wfs)
        qt = []
        q = None
        for _ in range(qutip_runs):
            q, el = R.run_ramp(wf, nbar, n, factor)
            qt.append(el)
        qv = np.array([q["energy_quanta"], q["l_quanta"], q["c_quanta"]])
        qm = np.array([q["x_scaled"], q["y_scaled"], q["d_scaled"]])
        scale = abs(qv[0])
        rows.append({
            "name": name, "N": n, "hlc": hlc, "ratio": ratio, "qstar": qstar,
            "qutip_hlc": qv, "qutip_ratio": q["energy_ratio"],
            "diff": float(np.max(np.abs(hlc - qv)) / scale),
            "diff_tight": float(max(np.max(np.abs(hlc_tight - qv)), np.max(np.abs(y_tight - qm))) / scale),
            "ratio_vs_qstar": abs(q["energy_ratio"] - qstar) / qstar,
            "t_scipy": statistics.median(times), "t_qutip": statistics.median(qt),
            "segments": len(segs),
        })
    return rows


def otto_moments(spec):
    """Limit cycle of the Otto cycle from the moment equations (scaled by omega_h)."""
    wh = spec["hot"]["omega_rad_s"]
    wc = spec["cold"]["omega_rad_s"]

    def bath(y, st):
        w = st["omega_rad_s"] / wh
        g = st["rate_per_s"] / wh
        e = st["occupation"] + 0.5
        tau = st["time_s"] * wh

        def rhs(s, v):
            return [2 * v[2] - g * (v[0] - e / w), -2 * w * w * v[2] - g * (v[1] - e * w),
                    v[1] - w * w * v[0] - g * v[2]]
        return solve_ivp(rhs, (0.0, tau), y, method="DOP853", rtol=1e-13, atol=1e-18).y[:, -1]

    def ramp(y, wa, wb, time_s):
        tau = time_s * wh
        a, b = wa / wh, (wb - wa) / wh / tau

        def rhs(s, v):
            u = (a + b * s) ** 2
            return [2 * v[2], -2 * u * v[2], v[1] - u * v[0]]
        return solve_ivp(rhs, (0.0, tau), y, method="DOP853", rtol=1e-13, atol=1e-18).y[:, -1]

    e = spec["hot"]["occupation"] + 0.5
    y = np.array([e, e, 0.0])
    t0 = time.perf_counter()
    for count in range(1, 200):
        y0 = y
        y1 = bath(y0, spec["hot"])
        y2 = ramp(y1, wh, wc, spec["expansion"]["time_s"])
        y3 = bath(y2, spec["cold"])
        y4 = ramp(y3, wc, wh, spec["compression"]["time_s"])
        change = np.max(np.abs(hlc_from_moments(y4, 1.0) - hlc_from_moments(y0, 1.0)))
        y = y4
        if change < 1e-13:
            break
    el = time.perf_counter() - t0
    r = wc / wh
    corners = [hlc_from_moments(y0, 1.0), hlc_from_moments(y1, 1.0),
               hlc_from_moments(y2, r) / r, hlc_from_moments(y3, r) / r]
    qh = hlc_from_moments(y1, 1.0)[0] - hlc_from_moments(y0, 1.0)[0]
    qc = hlc_from_moments(y3, r)[0] - hlc_from_moments(y2, r)[0]
    return corners, qh, qc, count, el


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--runs", type=int, default=5, help="SciPy runs per ramp (median)")
    ap.add_argument("--qutip-runs", type=int, default=3, help="QuTiP runs per ramp (median)")
    ap.add_argument("--json", default=os.path.join(HERE, "qutip_reference.json"),
                    help="QuTiP reference file for the Otto comparison")
    args = ap.parse_args()

    rows = ramp_rows(args.runs, args.qutip_runs)
    print("Ramps: SciPy DOP853 moments (rtol %.0e) vs QuTiP density matrix; (H, L, C) in hbar omega_i" % RTOL)
    for r in rows:
        print("  %-18s scipy  H=%.15f L=%+.15f C=%+.15f ratio=%.15f" % ((r["name"],) + tuple(r["hlc"]) + (r["ratio"],)))
        print("  %-18s qutip  H=%.15f L=%+.15f C=%+.15f ratio=%.15f" % (("",) + tuple(r["qutip_hlc"]) + (r["qutip_ratio"],)))
        print("  %-18s Husimi Q* from fundamental solutions = %.15f (|QuTiP ratio - Q*|/Q* = %.1e)"
              % ("", r["qstar"], r["ratio_vs_qstar"]))
    print()
    print("%-18s %4s %5s %14s %14s %12s %12s %9s" % ("ramp", "N", "segs", "max|d|/H", "tight max|d|/H",
                                                    "scipy s", "qutip s", "qutip/sp"))
    for r in rows:
        print("%-18s %4d %5d %14.2e %14.2e %12.4f %12.3f %9.0f" % (
            r["name"], r["N"], r["segments"], r["diff"], r["diff_tight"], r["t_scipy"], r["t_qutip"],
            r["t_qutip"] / r["t_scipy"]))
    print("(max|d|/H: SciPy at rtol 1e-10 vs QuTiP over H, L, C; tight: SciPy at rtol 1e-13 vs QuTiP over"
          " H, L, C, X, Y, D; times are medians of %d SciPy / %d QuTiP runs)" % (args.runs, args.qutip_runs))

    if os.path.exists(args.json):
        with open(args.json) as fh:
            ref = json.load(fh)
        cyc = ref["cycles"][0]
        corners, qh, qc, count, el = otto_moments(R.OTTO_CASE)
        print()
        print("Otto cycle: SciPy moments limit cycle (%d cycles, %.3f s) vs %s" % (count, el, os.path.basename(args.json)))
        worst = 0.0
        for c, m in zip(cyc["corners"], corners):
            q = np.array([c["energy_quanta"], c["l_quanta"], c["c_quanta"]])
            d = float(np.max(np.abs(q - m)))
            worst = max(worst, d)
            print("  %-20s moments H=%.13f L=%+.13f C=%+.13f  |d|max=%.1e" % ((c["label"],) + tuple(m) + (d,)))
        for key, v in (("heat_hot_quanta", qh), ("heat_cold_quanta", qc), ("work_out_quanta", qh + qc)):
            d = abs(cyc[key] - v)
            worst = max(worst, d)
            print("  %-20s moments %.13f  qutip %.13f  |d|=%.1e" % (key, v, cyc[key], d))
        print("  largest difference %.1e (hbar omega units)" % worst)


if __name__ == "__main__":
    main()
