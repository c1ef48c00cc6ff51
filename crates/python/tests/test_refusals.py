"""Refusals: the issue's array rules (ValueError) and file problems (OSError)."""

import numpy as np
import pytest
import quenchless as q

import cases

T = np.array([0.0, 1e-6, 2e-6])
W = np.array([1e6, 9e5, 8e5])


@pytest.mark.parametrize("t,w,message", [
    (T, W[:2], "t_s has 3 rows and omega_rad_s has 2: the arrays must have equal lengths"),
    (T[:1], W[:1], "at least 2 data rows, found 1"),
    (np.array([0.0, np.nan, 2e-6]), W, 'time "NaN" in data row 2 is not finite'),
    (T, np.array([1e6, np.inf, 8e5]), 'value "inf" in data row 2 is not finite'),
    (np.array([0.0, 2e-6, 1e-6]), W, "times must increase strictly"),
    (np.array([0.0, 0.0, 1e-6]), W, "times must increase strictly"),
    (np.stack([T, T]), np.stack([W, W]), "expected a 1-D array, this one has 2 dimensions (2 x 3)"),
    (T, np.array([1e6, -9e5, 8e5]), "must be > 0"),
])
def test_bad_arrays_raise_value_error(t, w, message):
    with pytest.raises(ValueError, match=None) as e:
        q.evaluate(t, w)
    assert message in str(e.value)


def test_one_value_column_only():
    with pytest.raises(ValueError, match="not both"):
        q.evaluate(T, W, omega2=W**2)
    with pytest.raises(ValueError, match="give omega_rad_s"):
        q.evaluate(T)


def test_bad_settings_name_the_argument():
    with pytest.raises(ValueError, match=r"tolerance 2: allowed a number in \(0, 1\)"):
        q.evaluate(T, W, tolerance=2.0)
    with pytest.raises(ValueError, match="accuracy 1: allowed 1e-15 to 1e-2"):
        q.evaluate(T, W, accuracy=1.0)
    with pytest.raises(ValueError, match="occupation -1: allowed"):
        q.evaluate(T, W, occupation=-1.0)
    with pytest.raises(ValueError, match="bare number"):
        q.quantity("35")
    with pytest.raises(ValueError, match="unknown"):
        q.quantity("35 furlongs")


def test_missing_study_is_an_os_error(tmp_path):
    with pytest.raises(OSError) as e:
        q.load_study(tmp_path / "nowhere.ron")
    assert isinstance(e.value, FileNotFoundError)
    assert "nowhere.ron" in str(e.value)


def test_unknown_candidate_is_refused():
    s = q.load_study(cases.STUDIES / "tweezer_expansion.ron")
    with pytest.raises(KeyError):
        s["no such ramp"]
    with pytest.raises(ValueError, match="no such ramp"):
        s.candidate("no such ramp")


def test_no_rust_debug_output_in_messages():
    # Messages are the command line's words, never Rust type names or debug output.
    for call in (lambda: q.evaluate(T, W[:2]), lambda: q.evaluate(T, W, tolerance=-1.0),
                 lambda: q.design_shortcut(-1.0, 15e3, duration_s=1e-6)):
        with pytest.raises(ValueError) as e:
            call()
        text = str(e.value)
        assert "Err(" not in text and "Some(" not in text and "::" not in text and "{" not in text


def test_progress_callback_that_raises_stops_the_map():
    def stop(done, total):
        raise RuntimeError("stop here")

    with pytest.raises(RuntimeError, match="stop here"):
        q.robustness_map(np.array([0.0, 3e-6]), np.array([1e6, 5e5]), hold=True, grid=200, progress=stop)


def test_ctrl_c_becomes_keyboard_interrupt():
    # SIGINT's default Python handler raises KeyboardInterrupt in the main thread
    # (Python docs, `signal` module); a long map must let it through and stop.
    import os
    import signal
    import threading
    import time

    t = np.linspace(0.0, 20e-6, 2000)
    w = 2 * np.pi * np.linspace(120e3, 15e3, 2000)
    timer = threading.Timer(0.3, lambda: os.kill(os.getpid(), signal.SIGINT))
    start = time.monotonic()
    timer.start()
    with pytest.raises(KeyboardInterrupt):
        q.robustness_map(t, w, grid=2048)
    timer.join()
    assert time.monotonic() - start < 10.0


def test_drive_settings_that_need_each_other_name_the_arguments():
    """The rules of `play --bits/--full-scale/--bipolar/--unipolar`, spelt as keywords
    (common practice, no source: a DAC code means nothing without the range it spans)."""
    s = q.load_study(cases.STUDIES / "tweezer_expansion.ron")
    with pytest.raises(ValueError, match="full_scale_hz needs bits"):
        s.play("shortcut 15 us", full_scale_hz=150e3)
    with pytest.raises(ValueError, match="bits 40: allowed 1 to 32"):
        s.play("shortcut 15 us", bits=40)
    with pytest.raises(ValueError, match="bipolar and unipolar: give one of them"):
        s.play("shortcut 15 us", bipolar=True, unipolar=True)
    _, ramp = q.design_shortcut(120e3, 15e3, duration_s=15e-6)
    with pytest.raises(ValueError, match="bits 12: needs full_scale_hz, or a study generator with a drive section"):
        ramp.play(1e8, bits=12)
    with pytest.raises(OSError):
        s.play("shortcut 15 us", calibration=cases.HERE / "no_such_table.csv")
