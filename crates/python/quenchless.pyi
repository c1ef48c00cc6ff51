"""Quenchless: design, verify, play and export trap-frequency ramps omega(t) of a
quantum harmonic oscillator. SI units: s, rad/s for omega, (rad/s)² for omega²; Hz only
where a name says so (an ordinary frequency nu = omega / 2 pi, not an omega)."""

import pathlib
from os import PathLike
from typing import Any, Callable, Literal, Optional, Sequence, Union

import numpy as np
import numpy.typing as npt

__version__: str
SCHEMA_VERSION: int
CAUTION: str

ArrayLike = Union[npt.ArrayLike, Sequence[float]]
Progress = Callable[[int, int], Any]
Path = Union[str, PathLike]

def evaluate(
    t_s: ArrayLike,
    omega_rad_s: Optional[ArrayLike] = None,
    *,
    omega2: Optional[ArrayLike] = None,
    hold: bool = False,
    occupation: float = 0.0,
    tolerance: float = 1e-3,
    end_frequencies_rad_s: Optional[tuple[float, float]] = None,
    accuracy: Optional[float] = None,
    name: str = "waveform",
) -> dict[str, Any]:
    """The figures of ``quenchless eval --waveform FILE --json`` for a table given as
    arrays: t_s (s), omega_rad_s (rad/s) or omega2 ((rad/s)²). Same keys, bit-identical
    values. ValueError with the command line's message for bad arrays."""

def load_study(path: Path) -> Study:
    """Reads a study profile (.ron). OSError (FileNotFoundError) for a file that cannot be
    read, ValueError for an invalid profile."""

def design_constant_mu(
    start_hz: float, end_hz: float, *, order: Optional[int] = None, near_time_s: Optional[float] = None
) -> tuple[dict[str, Any], Ramp]:
    """Constant-mu ramp of a frictionless order (``design constant-mu --json`` keys, and the ramp)."""

def design_shortcut(
    start_hz: float, end_hz: float, *, duration_s: Optional[float] = None, min_omega2: Optional[float] = None
) -> tuple[dict[str, Any], Ramp]:
    """Invariant-based shortcut, Q* = 1 (``design shortcut --json`` keys, and the ramp)."""

def design_bang_bang(start_hz: float, end_hz: float, min_hz: float, max_hz: float) -> tuple[dict[str, Any], Ramp]:
    """Time-optimal holds between bounds (``design bang-bang --json`` keys, and the ramp)."""

StrokeKind = Literal["linear", "sudden", "adiabatic", "shortcut", "constant-mu"]

def cycle(
    *,
    hot_freq_hz: Optional[float] = None,
    cold_freq_hz: Optional[float] = None,
    hot_occupation: Optional[float] = None,
    hot_temp_k: Optional[float] = None,
    cold_occupation: Optional[float] = None,
    cold_temp_k: Optional[float] = None,
    hot_rate_per_s: Optional[float] = None,
    cold_rate_per_s: Optional[float] = None,
    hot_time_s: Optional[float] = None,
    cold_time_s: Optional[float] = None,
    expand: Optional[StrokeKind] = None,
    expand_time_s: Optional[float] = None,
    expand_waveform: Optional[Path] = None,
    compress: Optional[StrokeKind] = None,
    compress_time_s: Optional[float] = None,
    compress_waveform: Optional[Path] = None,
    hold: bool = False,
    accuracy: Optional[float] = None,
) -> dict[str, Any]:
    """An Otto cycle from the ``cycle`` flags (``cycle --json`` keys)."""

def robustness_map(
    t_s: ArrayLike,
    omega_rad_s: Optional[ArrayLike] = None,
    *,
    omega2: Optional[ArrayLike] = None,
    hold: bool = False,
    end_frequencies_rad_s: Optional[tuple[float, float]] = None,
    calibration_error: float = 0.05,
    duration_error: float = 0.05,
    grid: int = 128,
    accuracy: Optional[float] = None,
    progress: Optional[Progress] = None,
) -> dict[str, npt.NDArray[np.float64]]:
    """Q* - 1 over calibration and duration errors (``sweep``): 1-D axes
    ``calibration_errors``, ``duration_errors``; 2-D ``q_star_minus_one`` and
    ``final_coherence_ratio`` indexed [duration, calibration]."""

def noise_map(
    t_s: ArrayLike,
    omega_rad_s: Optional[ArrayLike] = None,
    *,
    omega2: Optional[ArrayLike] = None,
    hold: bool = False,
    end_frequencies_rad_s: Optional[tuple[float, float]] = None,
    max_dephasing_per_s: float,
    max_amplitude_psd_s: float,
    occupation: float = 0.0,
    grid: int = 32,
    accuracy: Optional[float] = None,
    progress: Optional[Progress] = None,
) -> dict[str, npt.NDArray[np.float64]]:
    """Energy ratio - 1 over noise strengths (``sweep-noise``): 1-D
    ``dephasing_rates_per_s``, ``amplitude_psds_s``; 2-D ``energy_ratio_minus_one``
    indexed [amplitude, dephasing]."""

QuantityKind = Literal["frequency_hz", "time_s", "temperature_k", "length_m", "mass_kg", "sample_rate_per_s"]

def quantity(text: str) -> tuple[float, QuantityKind]:
    """"35 kHz" -> (35000.0, "frequency_hz"): SI value and kind. A frequency in Hz is an
    ordinary frequency nu, not an angular frequency omega = 2 pi nu."""

class Ramp:
    """A designed ramp or a study's candidate."""

    @property
    def name(self) -> str: ...
    @property
    def family(self) -> str: ...
    @property
    def duration_s(self) -> float: ...
    @property
    def omega_initial_rad_s(self) -> float: ...
    @property
    def omega_final_rad_s(self) -> float: ...
    def evaluate(
        self, *, tolerance: Optional[float] = None, accuracy: Optional[float] = None, occupation: Optional[float] = None
    ) -> dict[str, Any]:
        """``eval --json`` keys (a candidate: with ``axes``, ``trap_verdict``, ``worst_axis``)."""
    def trajectory(self, n: int = 801, *, accuracy: Optional[float] = None) -> dict[str, npt.NDArray[np.float64]]:
        """Arrays ``t_s``, ``omega2``, ``energy_quanta``, ``l_quanta``, ``c_quanta``,
        ``friction_quanta``, ``mu``, ``casimir_drift``."""
    def trap_check(
        self,
        *,
        shape: Optional[Literal["harmonic", "gaussian", "lorentzian"]] = None,
        length_m: Optional[float] = None,
        mass_kg: Optional[float] = None,
        gain: float = 1.0,
        offset_hz: float = 0.0,
        occupation: Optional[float] = None,
        tolerance: Optional[float] = None,
        loss_bound: float = 1e-6,
        progress: Optional[Progress] = None,
    ) -> dict[str, Any]:
        """``trap-check --json`` keys: every axis of the study's trap model, or one axis
        from the arguments with ``shape``."""
    def sample(
        self, rate_per_s: Optional[float] = None
    ) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
        """The trap as the generator plays it: (t_s, omega2) held rows."""
    def robustness_map(
        self,
        rate_per_s: Optional[float] = None,
        *,
        calibration_error: float = 0.05,
        duration_error: float = 0.05,
        grid: int = 128,
        accuracy: Optional[float] = None,
        progress: Optional[Progress] = None,
    ) -> dict[str, npt.NDArray[np.float64]]:
        """The robustness map of the ramp as played, every point the worst axis of the
        study's trap model; the keys of :func:`robustness_map`."""
    def play(
        self,
        rate_per_s: Optional[float] = None,
        *,
        tolerance: Optional[float] = None,
        midpoint: bool = False,
        bits: Optional[int] = None,
        full_scale_hz: Optional[float] = None,
        bipolar: bool = False,
        unipolar: bool = False,
        calibration: Optional[Path] = None,
        low_pass_s: Optional[float] = None,
        slew_per_s: Optional[float] = None,
        jitter_rms_s: Optional[float] = None,
        max_rate_per_s: Optional[float] = None,
        seed: int = 0,
        jitter_trials: int = 16,
        grid_ratio: float = 1.05,
        progress: Optional[Progress] = None,
    ) -> dict[str, Any]:
        """``play --json`` keys."""
    def export(
        self, path: Path, rate_per_s: Optional[float] = None, *, columns: Literal["si", "lab", "omega2"] = "si"
    ) -> dict[str, Any]:
        """Writes the trap as played with the ``export`` header (caution included)."""

class Study:
    """A study profile: candidates by name, its cycle."""

    @property
    def name(self) -> str: ...
    @property
    def path(self) -> "pathlib.Path": ...
    @property
    def candidates(self) -> list[str]: ...
    @property
    def tolerance(self) -> float: ...
    def __len__(self) -> int: ...
    def __contains__(self, name: str) -> bool: ...
    def __getitem__(self, name: str) -> Ramp: ...
    def candidate(self, name: str) -> Ramp: ...
    def evaluate(
        self, name: Optional[str] = None, *, tolerance: Optional[float] = None, accuracy: Optional[float] = None
    ) -> Union[dict[str, Any], list[dict[str, Any]]]:
        """``eval STUDY --json`` (a list), or ``--ramp NAME`` (a dict)."""
    def cycle(self, *, accuracy: Optional[float] = None) -> dict[str, Any]:
        """``cycle STUDY --json`` keys."""
    def play(self, name: str, rate_per_s: Optional[float] = None, **kwargs: Any) -> dict[str, Any]: ...
    def export(self, name: str, rate_per_s: Optional[float], path: Path, **kwargs: Any) -> dict[str, Any]: ...
