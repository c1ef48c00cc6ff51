"""Closed forms of the harmonic oscillator, each with its source."""

import math

import numpy as np
import pytest
import quenchless as q

TWO_PI = 2 * math.pi
TOL = 1e-9  # relative; the engine propagates to 1e-10 by default


def husimi(wi, wf):
    # Sudden quench from omega_i to omega_f: Q* = (wi² + wf²) / (2 wi wf).
    # Source: K. Husimi, Prog. Theor. Phys. 9, 381 (1953).
    return (wi**2 + wf**2) / (2 * wi * wf)


@pytest.mark.parametrize("nu_i,nu_f", [(120e3, 15e3), (50e3, 200e3), (1e6, 0.9e6)])
def test_sudden_quench_as_a_two_row_held_table(nu_i, nu_f):
    wi, wf = TWO_PI * nu_i, TWO_PI * nu_f
    t = np.array([0.0, 3e-6])
    r = q.evaluate(t, np.array([wi, wf]), hold=True)
    assert r["q_star"] == pytest.approx(husimi(wi, wf), rel=TOL)
    # The same table as omega².
    r2 = q.evaluate(t, omega2=np.array([wi**2, wf**2]), hold=True)
    assert r2["q_star"] == pytest.approx(husimi(wi, wf), rel=TOL)


def test_sudden_quench_map_is_flat():
    # Scaling every omega by 1 + e keeps wf/wi, and a sudden quench does not depend on
    # the hold time: the whole map is Husimi's Q* - 1 (source: as above).
    wi, wf = TWO_PI * 120e3, TWO_PI * 15e3
    calls = []
    m = q.robustness_map(np.array([0.0, 3e-6]), np.array([wi, wf]), hold=True, grid=5,
                         calibration_error=0.1, duration_error=0.1, progress=lambda d, n: calls.append((d, n)))
    assert m["q_star_minus_one"].shape == (5, 5)
    np.testing.assert_allclose(m["q_star_minus_one"], husimi(wi, wf) - 1, rtol=TOL)
    np.testing.assert_allclose(m["calibration_errors"], np.linspace(-0.1, 0.1, 5), rtol=1e-12, atol=1e-15)
    assert calls and calls[-1] == (25, 25)


def test_noise_free_corner_of_the_noise_map_is_husimi():
    # Without noise the energy ratio of a ground state after a sudden quench is Q*
    # (source: Husimi, as above).
    wi, wf = TWO_PI * 120e3, TWO_PI * 15e3
    m = q.noise_map(np.array([0.0, 3e-6]), np.array([wi, wf]), hold=True, grid=3,
                    max_dephasing_per_s=1e3, max_amplitude_psd_s=1e-9)
    assert m["energy_ratio_minus_one"].shape == (3, 3)
    assert m["energy_ratio_minus_one"][0, 0] == pytest.approx(husimi(wi, wf) - 1, rel=TOL)


def test_invariant_shortcut_is_frictionless():
    # The invariant-based shortcut ends with Q* = 1.
    # Source: X. Chen et al., Phys. Rev. Lett. 104, 063002 (2010).
    report, ramp = q.design_shortcut(120e3, 15e3, duration_s=20e-6)
    assert abs(report["q_star_minus_one"]) < 1e-10
    ev = ramp.evaluate()
    assert ev["q_star"] == pytest.approx(1.0, abs=1e-10)
    assert ev["verdict"] == "pass"
    assert ramp.omega_initial_rad_s == pytest.approx(TWO_PI * 120e3, rel=1e-15)
    # Its trajectory ends in the final trap with the initial ground state's energy:
    # half a quantum, L = C = 0 (Chen et al., as above).
    tr = ramp.trajectory(201)
    assert tr["energy_quanta"][-1] == pytest.approx(0.5, rel=1e-9)
    assert abs(tr["l_quanta"][-1]) < 1e-9 and abs(tr["c_quanta"][-1]) < 1e-9
    assert tr["t_s"][0] == 0.0 and tr["t_s"][-1] == pytest.approx(20e-6, rel=1e-15)
    assert np.all(np.diff(tr["t_s"]) > 0)


def test_otto_cycle_with_adiabatic_strokes_reaches_otto_efficiency():
    # Ideal adiabatic strokes and long thermalising contacts: efficiency 1 - wc/wh.
    # Source: Y. Rezek and R. Kosloff, New J. Phys. 8, 83 (2006).
    r = q.cycle(hot_freq_hz=200e3, cold_freq_hz=50e3, hot_occupation=5.0, cold_occupation=0.2,
                hot_rate_per_s=1e7, cold_rate_per_s=1e7, hot_time_s=1e-4, cold_time_s=1e-4,
                expand="adiabatic", expand_time_s=1e-5, compress="adiabatic", compress_time_s=1e-5)
    assert r["stable"] is True
    assert r["otto_efficiency"] == pytest.approx(0.75, rel=1e-12)
    assert r["efficiency"] == pytest.approx(0.75, rel=1e-9)


@pytest.mark.parametrize("text,value,kind", [
    ("35 kHz", 35e3, "frequency_hz"),
    ("150us", 150e-6, "time_s"),
    ("40 µK", 40e-6, "temperature_k"),
    ("2.4um", 2.4e-6, "length_m"),
    ("100 MS/s", 100e6, "sample_rate_per_s"),
])
def test_quantity_uses_the_si_prefixes(text, value, kind):
    # Source: SI brochure, 9th edition (BIPM 2019), table of SI prefixes.
    v, k = q.quantity(text)
    assert k == kind
    assert v == pytest.approx(value, rel=1e-15)


def test_quantity_atomic_mass_unit():
    # Source: CODATA 2018, m_u = 1.66053906660e-27 kg.
    v, k = q.quantity("87 u")
    assert k == "mass_kg" and v == pytest.approx(87 * 1.66053906660e-27, rel=1e-15)


def test_a_harmonic_trap_check_is_husimi():
    """Through the wavefunction solver a harmonic well's energy ratio is Husimi's Q*
    (here from the moment engine, an independent path) and its ground fidelity
    sqrt(2/(1 + Q*)) (K. Husimi, Prog. Theor. Phys. 9, 381 (1953)), on a linear ramp
    far from adiabatic and on the same ramp seen by an axis at a quarter of omega²."""
    from cases import STUDIES
    ramp = q.load_study(STUDIES / "tweezer_expansion.ron")["straight line"]
    q_star = ramp.evaluate()["q_star"]
    assert q_star > 1.01
    c = ramp.trap_check(shape="harmonic", occupation=0.0)
    assert abs(c["energy_ratio"] - q_star) < 1e-8
    assert abs(c["ground_fidelity"] - math.sqrt(2 / (1 + q_star))) < 1e-8
    slow = ramp.trap_check(shape="harmonic", gain=0.25)
    assert abs(slow["energy_ratio"] - slow["harmonic_q_star"]) < 1e-8
    with pytest.raises(ValueError, match="length_m: required"):
        ramp.trap_check(shape="gaussian")


def test_a_candidates_robustness_map_is_the_map_of_its_played_rows():
    """`Ramp.robustness_map()` plays the candidate as `sample()` does and maps those
    rows; on a one-axis study it equals `robustness_map()` of the same rows to the bit.
    At e = d = 0 the point is the played ramp's own Q* - 1 (`play()`'s
    `played_q_star_minus_one`), and Q* - 1 grows with |e| near the frictionless
    shortcut (Chen et al., PRL 104, 063002 (2010): only the designed ends are
    energy-diagonal)."""
    from cases import STUDIES
    import numpy as np
    ramp = q.load_study(STUDIES / "tweezer_expansion.ron")["shortcut 15 us"]
    m = ramp.robustness_map(calibration_error=0.02, duration_error=0.02, grid=5)
    t, w2 = ramp.sample()
    om = ramp.evaluate()
    rows = q.robustness_map(t, omega2=w2, hold=True, calibration_error=0.02, duration_error=0.02, grid=5,
                            end_frequencies_rad_s=(np.sqrt(w2[0]), np.sqrt(w2[-1])))
    assert np.array_equal(m["q_star_minus_one"], rows["q_star_minus_one"])
    centre = m["q_star_minus_one"][2, 2]
    played = ramp.play()["played_q_star_minus_one"]
    assert abs(centre - played) <= 1e-9 * max(abs(played), 1e-12) + 1e-15, (centre, played)
    assert m["q_star_minus_one"][2, 0] > 100 * centre and m["q_star_minus_one"][2, 4] > 100 * centre
    assert om["q_star_minus_one"] < 1e-9
