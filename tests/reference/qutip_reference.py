#!/usr/bin/env python3
"""Independent reference values for Quenchless: density-matrix propagation of a
harmonic oscillator in a truncated Fock basis with QuTiP.

This does NOT use the second-moment / Magnus / (H, L, C) machinery of the Rust
engine.  The state is a full density matrix rho (N x N) in the Fock basis of a
reference frequency w_ref, the Hamiltonian is the operator
    H(t) = P^2/2 + omega^2(t) Q^2/2          (m = 1, omega^2 may be negative)
with Q = (a + a^dag)/sqrt(2 w_ref), P = i sqrt(w_ref/2)(a^dag - a), and the
reported numbers are traces Tr(O rho).

Internal units: hbar = 1, m = 1, time in units of 1/w_ref (so inside the solver
w_ref = 1, Q = (a + a^dag)/sqrt 2, P = i (a^dag - a)/sqrt 2).  Conversions back:
    t_SI = t / w_ref,  energy_SI = hbar w_ref E,  Q_SI^2 = (hbar / w_ref) Q^2,
    P_SI^2 = hbar w_ref P^2,  (QP+PQ)/2 in SI = hbar (QP+PQ)/2.
hbar = h / (2 pi) with h = 6.62607015e-34 J s (exact, 2019 SI); the reported
numbers are ratios in which hbar cancels.

Usage:
    python qutip_reference.py --out FILE.json     write all reference values
    python qutip_reference.py --check FILE.json   recompute, compare, exit 1 on mismatch
    python qutip_reference.py --single WAVEFORM.csv --occupation NBAR [--hold]
Wall-clock time of every propagation goes to stderr.
"""

import argparse
import json
import math
import os
import sys
import time
import warnings

warnings.filterwarnings("ignore", message="matplotlib not found")
# one core: the budget is stated for a single thread, and BLAS threads fighting
# other jobs on a 2-core machine make the timings erratic
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("MKL_NUM_THREADS", "1")

import numpy as np  # noqa: E402
import scipy  # noqa: E402
import scipy.linalg  # noqa: E402
import scipy.sparse.linalg  # noqa: E402
import qutip  # noqa: E402

H_PLANCK = 6.62607015e-34  # J s, exact (2019 SI)
HBAR = H_PLANCK / (2.0 * math.pi)
TWO_PI = 2.0 * math.pi

HERE = os.path.dirname(os.path.abspath(__file__))
GENERATOR = "tests/reference/qutip_reference.py"

# ODE settings for QuTiP's solvers (dimensionless time, rho entries are O(1)).
ODE_OPTIONS = {
    "method": "dop853",
    "atol": 1e-13,
    "rtol": 1e-11,
    "nsteps": 10**8,
    "store_states": False,
    "store_final_state": True,
    "normalize_output": False,
    "progress_bar": "",
}

TRUNCATION_EXTRA = 40  # the truncation check reruns every case with N + 40
TRUNCATION_LIMIT = 1e-9

# The three reference ramps: (name, csv, reading, initial occupation,
# Fock dimension N, reference frequency as a multiple of omega_initial).
RAMP_CASES = [
    ("expand_smooth", "waveforms/expand_smooth.csv", "linear", 0.5, 80, math.sqrt(0.4)),
    ("compress_inverted", "waveforms/compress_inverted.csv", "linear", 1.0, 160, 3.0),
    ("hold_steps", "waveforms/hold_steps.csv", "hold", 0.2, 80, math.sqrt(0.75)),
]

OTTO_CASE = {
    "name": "otto_linear",
    "hot": {"omega_rad_s": TWO_PI * 100e3, "occupation": 2.0, "rate_per_s": 2.0e4, "time_s": 30e-6},
    "cold": {"omega_rad_s": TWO_PI * 50e3, "occupation": 0.3, "rate_per_s": 3.0e4, "time_s": 30e-6},
    "expansion": {"kind": "linear", "time_s": 10e-6},
    "compression": {"kind": "linear", "time_s": 10e-6},
}
OTTO_N = 100
OTTO_MAX_CYCLES = 60
OTTO_TOL = 1e-11  # change of (H, L, C) per cycle, units of hbar omega_h


def log(msg):
    print(msg, file=sys.stderr, flush=True)


# --------------------------------------------------------------------------
# Waveforms
# --------------------------------------------------------------------------

class Waveform:
    """A trap waveform read from CSV: header 't,omega' (rad/s) or 't,omega2'.

    reading 'linear': the stored column is linearly interpolated between rows
    (for an omega column, omega^2 is the square of the interpolated omega).
    reading 'hold': row k's value holds on [t_k, t_{k+1}); the last row is the
    end value (held for zero time).
    """

    def __init__(self, path, reading):
        if reading not in ("linear", "hold"):
            raise ValueError("reading must be 'linear' or 'hold'")
        self.path = path
        self.reading = reading
        rows = []
        header = None
        with open(path) as fh:
            for line in fh:
                line = line.strip()
                if not line or line.startswith("#"):
                    continue
                if header is None:
                    header = [c.strip() for c in line.split(",")]
                    continue
                parts = line.split(",")
                rows.append((float(parts[0]), float(parts[1])))
        if header is None or len(header) != 2 or header[0] != "t" or header[1] not in ("omega", "omega2"):
            raise ValueError("%s: header must be 't,omega' or 't,omega2', got %r" % (path, header))
        if len(rows) < 2:
            raise ValueError("%s: need at least two rows" % path)
        self.column = header[1]
        self.t = np.array([r[0] for r in rows])
        self.v = np.array([r[1] for r in rows])
        if self.t[0] != 0.0:
            raise ValueError("%s: t must start at 0" % path)
        if np.any(np.diff(self.t) <= 0.0):
            raise ValueError("%s: t must increase strictly" % path)
        if self.column == "omega" and np.any(self.v < 0.0):
            raise ValueError("%s: omega must be >= 0" % path)

    def omega2_at_row(self, k):
        v = self.v[k]
        return v * v if self.column == "omega" else v

    @property
    def duration(self):
        return float(self.t[-1])

    @property
    def omega_initial(self):
        w2 = self.omega2_at_row(0)
        if w2 <= 0.0:
            raise ValueError("initial omega^2 must be > 0")
        return math.sqrt(w2)

    @property
    def omega_final(self):
        w2 = self.omega2_at_row(len(self.t) - 1)
        if w2 <= 0.0:
            raise ValueError("final omega^2 must be > 0")
        return math.sqrt(w2)

    def segments(self):
        """Yield (t0, t1, v0, v1) for each stretch between rows (SI)."""
        for k in range(len(self.t) - 1):
            yield float(self.t[k]), float(self.t[k + 1]), float(self.v[k]), float(self.v[k + 1])


# --------------------------------------------------------------------------
# Fock basis
# --------------------------------------------------------------------------

class FockBasis:
    """Truncated Fock basis of reference frequency w_ref (rad/s), dimension N."""

    def __init__(self, n, w_ref):
        self.n = int(n)
        self.w_ref = float(w_ref)
        a = qutip.destroy(self.n)
        ad = a.dag()
        q = (a + ad) / math.sqrt(2.0)
        p = 1j * (ad - a) / math.sqrt(2.0)
        self.a = a
        self.q = q
        self.p = p
        self.q2 = (q * q).to("csr")
        self.p2 = (p * p).to("csr")
        self.qp_sym = (0.5 * (q * p + p * q)).to("csr")
        self.half_p2 = (0.5 * self.p2).to("csr")
        self.half_q2 = (0.5 * self.q2).to("csr")
        # dense copies for fast traces
        self._q2 = self.q2.full()
        self._p2 = self.p2.full()
        self._qp = self.qp_sym.full()

    def scaled(self, omega_si):
        return omega_si / self.w_ref

    def hamiltonian(self, omega2_si):
        """H = P^2/2 + omega^2 Q^2/2 in basis units (Qobj)."""
        w2 = omega2_si / self.w_ref**2
        return self.half_p2 + w2 * self.half_q2

    def ladder(self, omega_si):
        """a_w = sqrt(w/2) Q + i P / sqrt(2 w) (basis units)."""
        w = self.scaled(omega_si)
        return math.sqrt(w / 2.0) * self.q + 1j * self.p / math.sqrt(2.0 * w)

    def thermal(self, omega_si, nbar):
        """Thermal state of frequency omega with mean occupation nbar.

        Eigenvectors of the truncated P^2/2 + w^2 Q^2/2 (the low ones converge
        to the exact number states of frequency w), weighted with the exact
        Bose-Einstein populations nbar^k / (nbar + 1)^(k + 1) by rank k.
        """
        h = self.hamiltonian(omega_si**2).full().real  # real symmetric
        evals, evecs = np.linalg.eigh(h)
        k = np.arange(self.n)
        if nbar == 0.0:
            pk = (k == 0).astype(float)
        else:
            pk = np.exp(k * math.log(nbar / (nbar + 1.0))) / (nbar + 1.0)
        rho = (evecs * pk) @ evecs.conj().T
        rho = 0.5 * (rho + rho.conj().T)
        return qutip.Qobj(rho)

    def moments(self, rho):
        """(X, Y, D) = (<Q^2>, <P^2>, <(QP+PQ)/2>) in basis units (real parts)."""
        r = rho.full() if isinstance(rho, qutip.Qobj) else rho
        # Tr(O rho) = sum_ij O_ij rho_ji
        x = np.sum(self._q2 * r.T).real
        y = np.sum(self._p2 * r.T).real
        d = np.sum(self._qp * r.T).real
        return float(x), float(y), float(d)

    def hlc_quanta(self, rho, omega_si, unit_omega_si):
        """(H, L, C) at frequency omega divided by hbar * unit_omega."""
        x, y, d = self.moments(rho)
        w = self.scaled(omega_si)
        h = 0.5 * (y + w * w * x)
        l = 0.5 * (y - w * w * x)
        c = w * d
        s = self.w_ref / unit_omega_si  # basis energy unit hbar w_ref -> hbar unit_omega
        return h * s, l * s, c * s


# --------------------------------------------------------------------------
# Propagation
# --------------------------------------------------------------------------

def _coeff_linear(t, w0, dw):
    # omega(t) linear on the segment, omega^2 = its square
    w = w0 + dw * t
    return w * w


def _coeff_affine(t, u0, du):
    # omega^2(t) linear on the segment
    return u0 + du * t


def propagate_waveform(basis, rho, wf):
    """Unitary propagation of rho through the waveform (no collapse operators)."""
    wr = basis.w_ref
    if wf.reading == "hold":
        # exact: rho -> U rho U^dag with U = exp(-i H_k dt_k) from eigh of H_k
        r = rho.full()
        for t0, t1, v0, _v1 in wf.segments():
            w2 = v0 * v0 if wf.column == "omega" else v0
            h = basis.hamiltonian(w2).full().real  # real symmetric in the Fock basis
            e, v = np.linalg.eigh(h)
            dt = (t1 - t0) * wr
            u = (v * np.exp(-1j * e * dt)) @ v.conj().T
            r = u @ r @ u.conj().T
        r = 0.5 * (r + r.conj().T)
        return qutip.Qobj(r)

    if wf.column == "omega":
        ham = qutip.QobjEvo([basis.half_p2, [basis.half_q2, _coeff_linear]], args={"w0": 1.0, "dw": 0.0})
    else:
        ham = qutip.QobjEvo([basis.half_p2, [basis.half_q2, _coeff_affine]], args={"u0": 1.0, "du": 0.0})
    solver = qutip.MESolver(ham, c_ops=[], options=ODE_OPTIONS)
    state = rho
    for t0, t1, v0, v1 in wf.segments():
        # segment-local time tau in [0, (t1 - t0) w_ref]; waveform smooth inside
        tau = (t1 - t0) * wr
        if wf.column == "omega":
            args = {"w0": v0 / wr, "dw": (v1 - v0) / wr / tau}
        else:
            args = {"u0": v0 / wr**2, "du": (v1 - v0) / wr**2 / tau}
        res = solver.run(state, [0.0, tau], args=args)
        state = res.final_state
    return state


def run_ramp(wf, nbar, n, w_ref_factor):
    wi = wf.omega_initial
    wfin = wf.omega_final
    basis = FockBasis(n, w_ref_factor * wi)
    rho0 = basis.thermal(wi, nbar)
    h_start, _, _ = basis.hlc_quanta(rho0, wi, wi)
    t0 = time.perf_counter()
    rho = propagate_waveform(basis, rho0, wf)
    elapsed = time.perf_counter() - t0
    h, l, c = basis.hlc_quanta(rho, wfin, wi)
    x, y, d = basis.moments(rho)
    s = basis.w_ref / wi
    out = {
        "omega_initial_rad_s": wi,
        "omega_final_rad_s": wfin,
        "duration_s": wf.duration,
        "energy_quanta": h,
        "l_quanta": l,
        "c_quanta": c,
        "energy_ratio": h / ((wfin / wi) * h_start),
        "x_scaled": x / s,      # <Q^2> omega_i / hbar
        "y_scaled": y * s,      # <P^2> / (hbar omega_i)
        "d_scaled": d,          # <(QP+PQ)/2> / hbar
        "trace_minus_one": float(np.real(np.trace(rho.full())) - 1.0),
    }
    return out, elapsed


RAMP_KEYS = ["energy_quanta", "l_quanta", "c_quanta", "energy_ratio", "x_scaled", "y_scaled", "d_scaled"]


def relative_change(a, b, keys, scale):
    return max(abs(a[k] - b[k]) / max(scale, abs(a[k])) for k in keys)


def ramp_case(name, csv, reading, nbar, n, w_ref_factor, truncation=True):
    wf = Waveform(os.path.join(HERE, csv), reading)
    res, el = run_ramp(wf, nbar, n, w_ref_factor)
    log("%-18s N=%3d  propagation %.2f s" % (name, n, el))
    case = {
        "name": name,
        "waveform": csv,
        "reading": reading,
        "initial_occupation": nbar,
        "omega_initial_rad_s": res["omega_initial_rad_s"],
        "omega_final_rad_s": res["omega_final_rad_s"],
        "duration_s": res["duration_s"],
    }
    for k in RAMP_KEYS:
        case[k] = res[k]
    case["fock_dimension"] = n
    case["w_ref_rad_s"] = w_ref_factor * res["omega_initial_rad_s"]
    if truncation:
        big, el2 = run_ramp(wf, nbar, n + TRUNCATION_EXTRA, w_ref_factor)
        log("%-18s N=%3d  propagation %.2f s (truncation check)" % (name, n + TRUNCATION_EXTRA, el2))
        case["truncation_relative_change"] = relative_change(res, big, RAMP_KEYS, abs(res["energy_quanta"]))
    return case


# ---------------------------- Otto cycle -----------------------------------

def make_bath(b, stroke, full_lindblad=False):
    """Constant-generator Lindblad stroke: rho -> exp(tau L) rho.

    L is QuTiP's Liouvillian (column-stacked superoperator) of the
    Hamiltonian w(a_w^dag a_w + 1/2) = P^2/2 + w^2 Q^2/2 and the jumps
    sqrt(G (nbar + 1)) a_w, sqrt(G nbar) a_w^dag.  Its exponential acts on the
    stacked rho through scipy's expm_multiply (truncated Taylor series with
    scaling, double-precision target; Al-Mohy and Higham, SIAM J. Sci.
    Comput. 33, 488 (2011)).

    Default (split): exp(tau (L_H + L_D)) = exp(tau L_H) exp(tau L_D).  The
    thermal dissipator built from a_w is covariant under the free evolution
    with w(a_w^dag a_w + 1/2) (a_w -> a_w e^{-i w t} leaves D unchanged), so
    L_H and L_D commute; exp(tau L_H) is done exactly as rho -> U rho U^dag
    with U from eigh, and only the slow, non-oscillating L_D goes through
    expm_multiply.  full_lindblad=True exponentiates the whole L instead
    (about ten times slower; used to validate the split).
    """
    w = stroke["omega_rad_s"]
    g = stroke["rate_per_s"] / b.w_ref
    nb = stroke["occupation"]
    tau = stroke["time_s"] * b.w_ref
    aw = b.ladder(w)
    c_ops = [math.sqrt(g * (nb + 1.0)) * aw, math.sqrt(g * nb) * aw.dag()]
    ham = b.hamiltonian(w * w)
    bath = {"omega": w, "tau": tau}
    if full_lindblad:
        gen = qutip.liouvillian(ham, c_ops)
        bath["u"] = None
    else:
        gen = qutip.liouvillian(None, c_ops)
        e, v = np.linalg.eigh(ham.full().real)
        bath["u"] = (v * np.exp(-1j * e * tau)) @ v.conj().T
    bath["gen"] = (tau * gen).to("csr").data.as_scipy().tocsr()
    return bath


def apply_bath(b, bath, rho):
    """rho (N x N array) -> rho after the bath stroke made by make_bath."""
    n = b.n
    vec = np.asarray(rho, dtype=complex).reshape(-1, order="F")
    vec = scipy.sparse.linalg.expm_multiply(bath["gen"], vec, traceA=bath["gen"].diagonal().sum())
    r = vec.reshape((n, n), order="F")
    if bath["u"] is not None:
        r = bath["u"] @ r @ bath["u"].conj().T
    return 0.5 * (r + r.conj().T)


class OttoMaps:
    """The four strokes of the Otto cycle as maps on N x N density matrices."""

    def __init__(self, spec, n, full_lindblad=False):
        self.full_lindblad = full_lindblad
        hot, cold = spec["hot"], spec["cold"]
        self.wh = hot["omega_rad_s"]
        self.wc = cold["omega_rad_s"]
        self.basis = FockBasis(n, math.sqrt(self.wh * self.wc))
        b = self.basis
        wr = b.w_ref
        t0 = time.perf_counter()
        # ramps: propagators U from sesolve with the identity as initial state,
        # omega linear in time (omega^2 its square), one smooth solve each
        self.u_exp = self._ramp_propagator(self.wh, self.wc, spec["expansion"]["time_s"] * wr)
        self.u_comp = self._ramp_propagator(self.wc, self.wh, spec["compression"]["time_s"] * wr)
        t1 = time.perf_counter()
        log("otto N=%3d  ramp propagators %.2f s" % (n, t1 - t0))
        # baths: Lindblad with jumps sqrt(G(nbar+1)) a_w, sqrt(G nbar) a_w^dag and
        # Hamiltonian w(a_w^dag a_w + 1/2) = P^2/2 + w^2 Q^2/2
        self.hot = self._bath(hot)
        self.cold = self._bath(cold)

    def _ramp_propagator(self, wa, wb, tau):
        b = self.basis
        wr = b.w_ref
        ham = qutip.QobjEvo([b.half_p2, [b.half_q2, _coeff_linear]],
                            args={"w0": wa / wr, "dw": (wb - wa) / wr / tau})
        solver = qutip.SESolver(ham, options={k: v for k, v in ODE_OPTIONS.items() if k != "normalize_output"})
        res = solver.run(qutip.qeye(b.n), [0.0, tau])
        return res.final_state.full()

    def _bath(self, stroke):
        return make_bath(self.basis, stroke, self.full_lindblad)

    def bath_step(self, bath, rho):
        return apply_bath(self.basis, bath, rho)

    @staticmethod
    def unitary_step(u, rho):
        r = u @ rho @ u.conj().T
        return 0.5 * (r + r.conj().T)

    def cycle(self, rho):
        """Return the four corner states: end of hot, end of expansion, end of cold,
        end of compression (= start of the next hot stroke)."""
        r1 = self.bath_step(self.hot, rho)
        r2 = self.unitary_step(self.u_exp, r1)
        r3 = self.bath_step(self.cold, r2)
        r4 = self.unitary_step(self.u_comp, r3)
        return r1, r2, r3, r4


def otto_hlc(maps, rho, w):
    return np.array(maps.basis.hlc_quanta(rho, w, maps.wh))


def run_otto(spec, n, rho_start=None, full_lindblad=False, max_cycles=OTTO_MAX_CYCLES):
    """Iterate whole cycles until (H, L, C) at the start of the hot stroke
    changes by less than OTTO_TOL (units of hbar omega_h) over one cycle."""
    t0 = time.perf_counter()
    maps = OttoMaps(spec, n, full_lindblad=full_lindblad)
    b = maps.basis
    wh, wc = maps.wh, maps.wc
    if rho_start is None:
        rho = b.thermal(wh, spec["hot"]["occupation"]).full()
    else:
        rho = rho_start
    change = float("inf")
    count = 0
    prev = otto_hlc(maps, rho, wh)
    while count < max_cycles and not change < OTTO_TOL:
        start = rho
        r1, r2, r3, r4 = maps.cycle(start)
        rho = r4
        count += 1
        cur = otto_hlc(maps, rho, wh)
        change = float(np.max(np.abs(cur - prev)))
        prev = cur
    if not change < OTTO_TOL:
        log("WARNING: Otto cycle not converged after %d cycles (last change %.3e)" % (count, change))
    elapsed = time.perf_counter() - t0
    log("otto N=%3d  %d cycles, last change %.3e, total %.2f s" % (n, count, change, elapsed))
    # corners of the last cycle iterated (its start and end agree to < OTTO_TOL)
    labels = [("start of hot stroke", start, wh), ("end of hot stroke", r1, wh),
              ("end of expansion", r2, wc), ("end of cold stroke", r3, wc)]
    corners = []
    for label, r, w in labels:
        h, l, c = b.hlc_quanta(r, w, w)
        corners.append({"label": label, "omega_rad_s": w, "energy_quanta": h, "l_quanta": l, "c_quanta": c})
    heat_hot = b.hlc_quanta(r1, wh, wh)[0] - b.hlc_quanta(start, wh, wh)[0]
    heat_cold = b.hlc_quanta(r3, wc, wh)[0] - b.hlc_quanta(r2, wc, wh)[0]
    out = {
        "cycles_iterated": count,
        "last_cycle_change": change,
        "corners": corners,
        "work_out_quanta": heat_hot + heat_cold,
        "heat_hot_quanta": heat_hot,
        "heat_cold_quanta": heat_cold,
    }
    return out, rho, maps


def otto_flat(o):
    vals = {"work_out_quanta": o["work_out_quanta"], "heat_hot_quanta": o["heat_hot_quanta"],
            "heat_cold_quanta": o["heat_cold_quanta"]}
    for i, c in enumerate(o["corners"]):
        for k in ("energy_quanta", "l_quanta", "c_quanta"):
            vals["corner%d_%s" % (i, k)] = c[k]
    return vals


def otto_case(truncation=True):
    spec = OTTO_CASE
    out, start, maps = run_otto(spec, OTTO_N)
    case = {"name": spec["name"], "hot": dict(spec["hot"]), "cold": dict(spec["cold"]),
            "expansion": dict(spec["expansion"]), "compression": dict(spec["compression"])}
    case.update(out)
    case["fock_dimension"] = OTTO_N
    case["w_ref_rad_s"] = maps.basis.w_ref
    if truncation:
        nb = OTTO_N + TRUNCATION_EXTRA
        padded = np.zeros((nb, nb), dtype=complex)
        padded[:OTTO_N, :OTTO_N] = start
        big, _, _ = run_otto(spec, nb, rho_start=padded)
        a, c = otto_flat(out), otto_flat(big)
        scale = max(abs(x["energy_quanta"]) for x in out["corners"])
        case["truncation_relative_change"] = relative_change(a, c, list(a), scale)
    return case


# --------------------------------------------------------------------------
# Driver
# --------------------------------------------------------------------------

def compute_all(truncation=True):
    ramps = [ramp_case(*c, truncation=truncation) for c in RAMP_CASES]
    cycles = [otto_case(truncation=truncation)]
    trunc = max([r.get("truncation_relative_change", 0.0) for r in ramps + cycles])
    result = {
        "generator": GENERATOR,
        "qutip_version": qutip.__version__,
        "numpy_version": np.__version__,
        "scipy_version": scipy.__version__,
        "fock_dimension": max([r["fock_dimension"] for r in ramps + cycles]),
        "truncation_relative_change": trunc if truncation else None,
        "truncation_extra": TRUNCATION_EXTRA,
        "truncation_note": ("fock_dimension is the largest per-case N; each case was rerun with N + truncation_extra "
                            "and truncation_relative_change is the largest change of its reported numbers, "
                            "over max(|case energy|, |number|)"),
        "units": ("hbar = h/(2 pi), h = 6.62607015e-34 J s; m = 1; *_quanta: ramps in hbar omega_initial, "
                  "corners in hbar omega of the corner, heats and work in hbar omega_hot; "
                  "x_scaled = <Q^2> omega_i/hbar, y_scaled = <P^2>/(hbar omega_i), d_scaled = <(QP+PQ)/2>/hbar"),
        "ramps": ramps,
        "cycles": cycles,
    }
    if truncation and trunc > TRUNCATION_LIMIT:
        log("WARNING: truncation change %.3e above %.1e" % (trunc, TRUNCATION_LIMIT))
    return result


CHECK_TOL = 1e-8
SOFT_KEYS = ("qutip_version", "numpy_version", "scipy_version")  # reported, not failed


def compare(ref, new, tol=CHECK_TOL):
    """Mismatches between a stored result and a recomputed one.

    A number passes when |stored - now| <= tol * max(scale, |stored|), where
    scale is the case's energy (a ramp's energy_quanta; for a cycle the largest
    corner energy_quanta; 1 for top-level entries).  Tiny numbers (truncation
    and last-cycle changes, l/c near 0) are thus compared absolutely at the
    energy scale, large ones (frequencies) relatively.  Strings must be equal;
    cycles_iterated may move by 2; library versions only print a note.
    """
    bad = []

    def walk(path, x, y, scale):
        if isinstance(x, dict):
            if not isinstance(y, dict):
                bad.append("%s: not an object in the recomputation" % path)
                return
            for k in x:
                p = "%s.%s" % (path, k) if path else k
                if k not in y:
                    bad.append("%s: missing in the recomputation" % p)
                elif k in SOFT_KEYS:
                    if x[k] != y[k]:
                        log("note: %s is %s in the file, %s now" % (k, x[k], y[k]))
                elif k == "cycles_iterated":
                    if abs(x[k] - y[k]) > 2:
                        bad.append("%s: file %r, now %r" % (p, x[k], y[k]))
                else:
                    walk(p, x[k], y[k], scale)
            for k in y:
                if k not in x:
                    bad.append("%s: not in the file" % ("%s.%s" % (path, k) if path else k))
        elif isinstance(x, list):
            if not isinstance(y, list) or len(x) != len(y):
                bad.append("%s: list length differs" % path)
                return
            for i, (u, v) in enumerate(zip(x, y)):
                sc = scale
                if path in ("ramps",):
                    sc = abs(u.get("energy_quanta", 1.0))
                elif path in ("cycles",):
                    sc = max([abs(c.get("energy_quanta", 1.0)) for c in u.get("corners", [])] or [1.0])
                walk("%s[%d]" % (path, i), u, v, sc)
        elif isinstance(x, bool) or x is None or isinstance(x, str):
            if x != y:
                bad.append("%s: file %r, now %r" % (path, x, y))
        elif isinstance(x, (int, float)):
            if isinstance(y, bool) or not isinstance(y, (int, float)):
                bad.append("%s: file %r, now %r" % (path, x, y))
                return
            lim = tol * max(scale, abs(x))
            if not abs(x - y) <= lim:
                bad.append("%s: file %r, now %r (|diff| %.3e > %.3e)" % (path, x, y, abs(x - y), lim))
        else:
            bad.append("%s: unexpected type %s" % (path, type(x).__name__))

    walk("", ref, new, 1.0)
    return bad


def single(path, nbar, hold, n=100):
    """One ramp from an arbitrary waveform file; N grows by 40 until the
    N -> N + 40 change is below TRUNCATION_LIMIT (or N reaches 400)."""
    wf = Waveform(path, "hold" if hold else "linear")
    wi, wfin = wf.omega_initial, wf.omega_final
    factor = math.sqrt(wfin / wi)  # w_ref = geometric mean of the end frequencies
    res, el = run_ramp(wf, nbar, n, factor)
    log("single N=%3d  propagation %.2f s" % (n, el))
    while True:
        big, el2 = run_ramp(wf, nbar, n + TRUNCATION_EXTRA, factor)
        log("single N=%3d  propagation %.2f s (truncation check)" % (n + TRUNCATION_EXTRA, el2))
        change = relative_change(res, big, RAMP_KEYS, abs(res["energy_quanta"]))
        if change < TRUNCATION_LIMIT or n + TRUNCATION_EXTRA >= 400:
            break
        n += TRUNCATION_EXTRA
        res = big
    out = {
        "name": os.path.splitext(os.path.basename(path))[0],
        "waveform": path,
        "reading": wf.reading,
        "initial_occupation": nbar,
        "omega_initial_rad_s": wi,
        "omega_final_rad_s": wfin,
        "duration_s": wf.duration,
    }
    for k in RAMP_KEYS:
        out[k] = res[k]
    out["fock_dimension"] = n
    out["w_ref_rad_s"] = factor * wi
    out["truncation_relative_change"] = change
    if change >= TRUNCATION_LIMIT:
        log("WARNING: truncation change %.3e above %.1e even at N=%d" % (change, TRUNCATION_LIMIT, n))
    return out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    g = ap.add_mutually_exclusive_group(required=True)
    g.add_argument("--out", metavar="FILE.json", help="compute and write all reference values")
    g.add_argument("--check", metavar="FILE.json", help="recompute and compare with FILE.json")
    g.add_argument("--single", metavar="WAVEFORM.csv", help="one ramp from an arbitrary waveform file")
    ap.add_argument("--occupation", type=float, help="initial mean occupation (with --single)")
    ap.add_argument("--hold", action="store_true", help="sample-and-hold reading (with --single)")
    args = ap.parse_args(argv)

    t0 = time.perf_counter()
    if args.single:
        if args.occupation is None:
            ap.error("--single needs --occupation")
        print(json.dumps(single(args.single, args.occupation, args.hold), indent=2))
        return 0
    if args.out:
        result = compute_all()
        with open(args.out, "w") as fh:
            json.dump(result, fh, indent=2)
            fh.write("\n")
        log("wrote %s in %.1f s" % (args.out, time.perf_counter() - t0))
        return 0
    with open(args.check) as fh:
        ref = json.load(fh)
    new = compute_all()
    bad = compare(ref, new)
    log("check took %.1f s" % (time.perf_counter() - t0))
    if bad:
        print("reference differs:")
        for b in bad:
            print("  " + b)
        return 1
    print("reference matches")
    return 0


if __name__ == "__main__":
    sys.exit(main())
