"""The cases compared with the command line, key for key.

Each case names the exact `quenchless` command (its stdout JSON, or the file it
writes, is the reference) and the Python call that must give the same. The
committed references in fixtures/ were written by make_fixtures.py with the CLI
binary; with QUENCHLESS_BIN set, the tests run that binary instead.
"""

import math
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parents[2]
STUDIES = REPO / "sample_profiles"
WAVEFORMS = HERE / "fixtures" / "waveforms"
CALIBRATION = HERE / "fixtures" / "tweezer_calibration.csv"


def read_table(path):
    """The rows of a CSV waveform (header `t,omega` or `t,omega2`) and its stated
    end frequencies: Python's float() reads the decimal text to the same bits as
    the command line's reader."""
    t, v, ends = [], [], None
    header_seen = False
    for line in Path(path).read_text().splitlines():
        line = line.strip()
        if not line:
            continue
        if line.startswith("#"):
            body = line[1:].strip()
            if body.startswith("end_frequencies_rad_s:"):
                a, b = body.split(":", 1)[1].split(",")
                ends = (float(a), float(b))
            continue
        if not header_seen:
            header_seen = True
            continue
        a, b = line.split(",")
        t.append(float(a))
        v.append(float(b))
    return t, v, ends


def read_table_loose(path):
    """Rows of a table that may hold NaN (float() reads "NaN" as the CLI does)."""
    return read_table(path)


def _waveform(name, cli_flags, **kwargs):
    path = WAVEFORMS / f"{name}.csv"

    def call(q):
        import numpy as np

        t, v, ends = read_table(path)
        column = "omega2" if "dip" in name else "omega_rad_s"
        args = {column: np.array(v)}
        if ends is not None:
            args["end_frequencies_rad_s"] = ends
        return q.evaluate(np.array(t), **args, name=name, **kwargs)

    return ["eval", "--waveform", str(path), *cli_flags, "--json"], call


def _candidate(study, name):
    path = STUDIES / study
    return (
        ["eval", str(path), "--ramp", name, "--json"],
        lambda q: q.load_study(path)[name].evaluate(),
    )


def _slug(s):
    return "".join(c if c.isalnum() else "_" for c in s).strip("_")


# The sample studies' candidates (names as in the .ron files).
CANDIDATES = {
    "tweezer_expansion.ron": [
        "straight line",
        "constant mu, first frictionless order",
        "shortcut 15 us",
        "hand-shaped spline",
    ],
    "single_ion_engine.ron": ["expansion shortcut", "compression shortcut", "expansion linear"],
    "ion_compression_tight.ron": ["shortcut 120 ns", "linear 120 ns", "two holds"],
    "tweezer_two_axes.ron": ["shortcut 5 us", "shortcut 60 us"],
}


def json_cases():
    """(id, CLI arguments, Python call returning the same object). Values the command
    line reads with a unit ("15us" is 15 x 1e-6 s, one ulp from 15e-6) are read by
    quantity(), the same parser, so both sides get the same bits."""
    cases = [
        ("waveform_linear", *_waveform("expansion_smooth", [])),
        (
            "waveform_hold_occupation",
            *_waveform(
                "expansion_smooth",
                ["--hold", "--occupation", "2", "--tolerance", "1e-4"],
                hold=True,
                occupation=2.0,
                tolerance=1e-4,
            ),
        ),
        ("waveform_accuracy", *_waveform("expansion_smooth", ["--accuracy", "1e-12"], accuracy=1e-12)),
        ("waveform_dip_omega2_hold", *_waveform("dip_omega2", ["--hold"], hold=True)),
    ]
    for study, names in CANDIDATES.items():
        for name in names:
            cases.append((f"eval_{_slug(study[:-4])}_{_slug(name)}", *_candidate(study, name)))
        path = STUDIES / study
        cases.append(
            (f"eval_{_slug(study[:-4])}_all", ["eval", str(path), "--json"], lambda q, p=path: q.load_study(p).evaluate())
        )
    tweezer = STUDIES / "tweezer_two_axes.ron"
    cases += [
        # The anharmonic check of every axis of the study's trap model.
        (
            "trap_check_tweezer_two_axes_shortcut_5_us",
            ["trap-check", str(tweezer), "--ramp", "shortcut 5 us", "--json"],
            lambda q, p=tweezer: q.load_study(p)["shortcut 5 us"].trap_check(),
        ),
        # One harmonic axis from the arguments (gain and a negative offset).
        (
            "trap_check_tweezer_two_axes_harmonic_flags",
            ["trap-check", str(tweezer), "--ramp", "shortcut 5 us", "--shape", "harmonic", "--gain", "0.3",
             "--offset=-5kHz", "--json"],
            lambda q, p=tweezer: q.load_study(p)["shortcut 5 us"].trap_check(
                shape="harmonic", gain=0.3, offset_hz=q.quantity("-5kHz")[0]),
        ),
        # One harmonic axis of a study with a thermal start: both sides default the
        # occupation to the study's start state seen on that axis.
        (
            "trap_check_tweezer_expansion_harmonic_half_gain",
            ["trap-check", str(STUDIES / "tweezer_expansion.ron"), "--ramp", "shortcut 15 us", "--shape",
             "harmonic", "--gain", "0.5", "--json"],
            lambda q: q.load_study(STUDIES / "tweezer_expansion.ron")["shortcut 15 us"].trap_check(
                shape="harmonic", gain=0.5),
        ),
        (
            "design_constant_mu_order",
            ["design", "constant-mu", "--from", "120kHz", "--to", "15kHz", "--order", "1", "--json"],
            lambda q: q.design_constant_mu(120e3, 15e3, order=1)[0],
        ),
        (
            "design_constant_mu_near_time",
            ["design", "constant-mu", "--from", "120kHz", "--to", "15kHz", "--near-time", "30us", "--json"],
            lambda q: q.design_constant_mu(120e3, 15e3, near_time_s=q.quantity("30us")[0])[0],
        ),
        (
            "design_shortcut_time",
            ["design", "shortcut", "--from", "120kHz", "--to", "15kHz", "--time", "15us", "--json"],
            lambda q: q.design_shortcut(120e3, 15e3, duration_s=q.quantity("15us")[0])[0],
        ),
        (
            "design_shortcut_floor",
            ["design", "shortcut", "--from", "120kHz", "--to", "15kHz", "--min-omega2", "0", "--json"],
            lambda q: q.design_shortcut(120e3, 15e3, min_omega2=0.0)[0],
        ),
        (
            "design_bang_bang",
            ["design", "bang-bang", "--from", "120kHz", "--to", "15kHz", "--min", "10kHz", "--max", "150kHz", "--json"],
            lambda q: q.design_bang_bang(120e3, 15e3, 10e3, 150e3)[0],
        ),
        (
            "cycle_study",
            ["cycle", str(STUDIES / "single_ion_engine.ron"), "--json"],
            lambda q: q.load_study(STUDIES / "single_ion_engine.ron").cycle(),
        ),
        (
            "cycle_flags",
            [
                "cycle", "--hot-freq", "200kHz", "--cold-freq", "50kHz", "--hot-occupation", "5",
                "--cold-occupation", "0.5", "--hot-rate", "1e5", "--cold-rate", "1e5", "--hot-time", "50us",
                "--cold-time", "50us", "--expand", "shortcut", "--expand-time", "10us", "--compress", "linear",
                "--compress-time", "10us", "--json",
            ],
            lambda q: q.cycle(
                hot_freq_hz=200e3, cold_freq_hz=50e3, hot_occupation=5.0, cold_occupation=0.5,
                hot_rate_per_s=1e5, cold_rate_per_s=1e5, hot_time_s=q.quantity("50us")[0],
                cold_time_s=q.quantity("50us")[0], expand="shortcut", expand_time_s=q.quantity("10us")[0],
                compress="linear", compress_time_s=q.quantity("10us")[0],
            ),
        ),
        (
            "play_tweezer_shortcut",
            ["play", str(STUDIES / "tweezer_expansion.ron"), "--ramp", "shortcut 15 us", "--json"],
            lambda q: q.load_study(STUDIES / "tweezer_expansion.ron").play("shortcut 15 us"),
        ),
        (
            "play_tweezer_bits_full_scale",
            ["play", str(STUDIES / "tweezer_expansion.ron"), "--ramp", "shortcut 15 us", "--bits", "10",
             "--full-scale", "150kHz", "--json"],
            lambda q: q.load_study(STUDIES / "tweezer_expansion.ron").play(
                "shortcut 15 us", bits=10, full_scale_hz=150e3
            ),
        ),
        (
            "play_tweezer_calibration_unipolar",
            ["play", str(STUDIES / "tweezer_expansion.ron"), "--ramp", "shortcut 15 us", "--calibration",
             str(CALIBRATION), "--unipolar", "--json"],
            lambda q: q.load_study(STUDIES / "tweezer_expansion.ron").play(
                "shortcut 15 us", calibration=CALIBRATION, unipolar=True
            ),
        ),
        (
            "play_two_axes_rate",
            ["play", str(STUDIES / "tweezer_two_axes.ron"), "--ramp", "shortcut 5 us", "--rate", "2e7", "--json"],
            lambda q: q.load_study(STUDIES / "tweezer_two_axes.ron").play("shortcut 5 us", 2e7),
        ),
    ]
    return cases


def export_cases():
    """(id, CLI arguments before --out, Python call writing the same file to a path)."""
    return [
        (
            "export_tweezer_shortcut_si",
            ["export", str(STUDIES / "tweezer_expansion.ron"), "--ramp", "shortcut 15 us"],
            lambda q, out: q.load_study(STUDIES / "tweezer_expansion.ron").export("shortcut 15 us", None, out),
        ),
        (
            "export_ion_holds_lab",
            ["export", str(STUDIES / "ion_compression_tight.ron"), "--ramp", "two holds", "--rate", "1GS/s",
             "--columns", "lab"],
            lambda q, out: q.load_study(STUDIES / "ion_compression_tight.ron").export(
                "two holds", 1e9, out, columns="lab"
            ),
        ),
        (
            "export_two_axes_omega2",
            ["export", str(STUDIES / "tweezer_two_axes.ron"), "--ramp", "shortcut 60 us", "--columns", "omega2"],
            lambda q, out: q.load_study(STUDIES / "tweezer_two_axes.ron").export(
                "shortcut 60 us", None, out, columns="omega2"
            ),
        ),
    ]


def relative(args):
    """The arguments with the repository's path removed (for the README of fixtures)."""
    return [a.replace(str(REPO) + "/", "") for a in args]

