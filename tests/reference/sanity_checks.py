#!/usr/bin/env python3
"""Sanity checks of the QuTiP reference against closed forms.  Prints one line
per check and exits 1 if any fails.  About half a minute on one core.

1. Sudden quench omega_i -> omega_f of a thermal state: energy ratio
   (omega_i^2 + omega_f^2)/(2 omega_i omega_f) (K. Husimi, Prog. Theor. Phys. 9,
   381 (1953)); the ratio stays put during a later hold at omega_f.
2. Invariant K = XY - D^2 = hbar^2 (nbar + 1/2)^2 after each unitary reference
   ramp (the Casimir invariant of the moment dynamics: Y. Rezek and R. Kosloff,
   New J. Phys. 8, 83 (2006)), read from qutip_reference.json.
3. Long bath stroke: H -> H_eq = hbar w (nbar + 1/2) = (hbar w/2) coth(hbar w/2 k_B T)
   with k_B T = hbar w / ln(1 + 1/nbar), L, C -> 0 (Rezek and Kosloff 2006), and
   the closed form H(t) = H_eq + (H0 - H_eq) exp(-G t) at an intermediate time.
4. The split bath propagator (exact free evolution times exp(tau L_D)) against
   the exponential of the whole Liouvillian, for both Otto bath strokes.
"""

import math
import os
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import qutip_reference as R  # noqa: E402
import json  # noqa: E402
import numpy as np  # noqa: E402

K_B = 1.380649e-23  # J/K, exact (2019 SI)
FAILED = []


def report(name, value, expected, tol):
    err = abs(value - expected) / max(abs(expected), 1e-300)
    ok = err <= tol
    if not ok:
        FAILED.append(name)
    print("%-4s %-62s %.15g vs %.15g (rel %.1e, tol %.0e)" % ("ok" if ok else "FAIL", name, value, expected, err, tol))


def report_abs(name, value, tol):
    ok = abs(value) <= tol
    if not ok:
        FAILED.append(name)
    print("%-4s %-62s %.3e (tol %.0e)" % ("ok" if ok else "FAIL", name, value, tol))


def sudden_quench():
    wi, wf = R.TWO_PI * 100e3, R.TWO_PI * 40e3
    expected = (wi * wi + wf * wf) / (2.0 * wi * wf)  # Husimi (1953), sudden limit
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "sudden.csv")
        with open(path, "w") as fh:
            fh.write("t,omega\n0.0,%r\n1e-6,%r\n3e-6,%r\n" % (wi, wf, wf))
        wfm = R.Waveform(path, "hold")
        for nbar in (0.0, 0.5, 2.0):
            res, _ = R.run_ramp(wfm, nbar, 200, math.sqrt(wf / wi))
            report("sudden quench 100->40 kHz, nbar=%g: energy ratio" % nbar, res["energy_ratio"], expected, 1e-12)


def invariant():
    with open(os.path.join(HERE, "qutip_reference.json")) as fh:
        ref = json.load(fh)
    for r in ref["ramps"]:
        k = r["x_scaled"] * r["y_scaled"] - r["d_scaled"] ** 2
        report("invariant XY - D^2 after %s" % r["name"], k, (r["initial_occupation"] + 0.5) ** 2, 1e-10)


def long_bath():
    w = R.TWO_PI * 100e3
    nbar = 2.0
    g = 2.0e4
    b = R.FockBasis(120, w / math.sqrt(2.0))
    # start: thermal at another frequency, so L != 0 at the start (squeezed w.r.t. w)
    rho0 = b.thermal(w / 2.0, 0.3).full()
    h0, l0, c0 = b.hlc_quanta(rho0, w, w)
    kt = R.HBAR * w / math.log1p(1.0 / nbar)  # k_B T with nbar = 1/(exp(hbar w/k_B T) - 1)
    h_eq = 0.5 / math.tanh(R.HBAR * w / (2.0 * kt))  # (hbar w / 2) coth(hbar w / 2 k_B T) in hbar w
    report("H_eq = coth form vs nbar + 1/2 (nbar=%g)" % nbar, h_eq, nbar + 0.5, 1e-14)
    t_mid = 30e-6
    bath = R.make_bath(b, {"omega_rad_s": w, "occupation": nbar, "rate_per_s": g, "time_s": t_mid})
    r = R.apply_bath(b, bath, rho0)
    h, l, c = b.hlc_quanta(r, w, w)
    report("bath %g us: H = H_eq + (H0 - H_eq) exp(-G t)" % (t_mid * 1e6), h,
           h_eq + (h0 - h_eq) * math.exp(-g * t_mid), 1e-11)
    rot = 2.0 * w * t_mid
    damp = math.exp(-g * t_mid)
    report("bath %g us: L rotates at 2w and decays" % (t_mid * 1e6), l,
           damp * (l0 * math.cos(rot) - c0 * math.sin(rot)), 1e-9)
    t_long = 2e-3  # G t = 40
    bath = R.make_bath(b, {"omega_rad_s": w, "occupation": nbar, "rate_per_s": g, "time_s": t_long})
    r = R.apply_bath(b, bath, rho0)
    h, l, c = b.hlc_quanta(r, w, w)
    report("bath %g ms (G t = 40): H -> (hbar w/2) coth(hbar w/2 k_B T)" % (t_long * 1e3), h, h_eq, 1e-11)
    report_abs("bath %g ms: |L| + |C| (in hbar w)" % (t_long * 1e3), abs(l) + abs(c), 1e-11)


def split_vs_full():
    spec = R.OTTO_CASE
    wh, wc = spec["hot"]["omega_rad_s"], spec["cold"]["omega_rad_s"]
    b = R.FockBasis(R.OTTO_N, math.sqrt(wh * wc))
    rho = b.thermal(wc, 0.7).full()
    for key in ("hot", "cold"):
        st = spec[key]
        a = R.apply_bath(b, R.make_bath(b, st, False), rho)
        f = R.apply_bath(b, R.make_bath(b, st, True), rho)
        ha = np.array(b.hlc_quanta(a, st["omega_rad_s"], st["omega_rad_s"]))
        hf = np.array(b.hlc_quanta(f, st["omega_rad_s"], st["omega_rad_s"]))
        report_abs("%s bath N=%d: split vs whole Liouvillian, max |d(H,L,C)|" % (key, b.n),
                   float(np.max(np.abs(ha - hf))), 1e-10)
        report_abs("%s bath N=%d: split vs whole Liouvillian, max |d rho_ij|" % (key, b.n),
                   float(np.max(np.abs(a - f))), 1e-12)


def main():
    sudden_quench()
    invariant()
    long_bath()
    split_vs_full()
    if FAILED:
        print("%d check(s) failed" % len(FAILED))
        return 1
    print("all sanity checks passed")
    return 0


if __name__ == "__main__":
    sys.exit(main())
