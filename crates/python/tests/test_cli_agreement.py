"""Agreement with the command line, key for key and bit for bit.

Source of every expected value: the `quenchless` binary's output for the command
named in cases.py (run live when QUENCHLESS_BIN is set, else the committed
fixtures/, written by make_fixtures.py with that binary; fixtures/README.md lists
the commands).
"""

import json
import os
import re
import subprocess

import numpy as np
import pytest
import quenchless as q

import cases

BIN = os.environ.get("QUENCHLESS_BIN")


def cli_json(cid, args):
    if BIN:
        out = subprocess.run([BIN, *cases.relative(args)], cwd=cases.REPO, check=True, capture_output=True, text=True)
        return json.loads(out.stdout)
    return json.loads((cases.HERE / "fixtures" / f"{cid}.json").read_text())


def cli_file(cid, args, tmp_path):
    if BIN:
        target = tmp_path / "cli.csv"
        subprocess.run([BIN, *cases.relative(args), "--out", str(target)], cwd=cases.REPO, check=True,
                       capture_output=True)
        return target.read_bytes()
    return (cases.HERE / "fixtures" / f"{cid}.csv").read_bytes()


def cli_error(name):
    """The command line's refusal of a bad table, without `error: FILE:LINE:COL: `."""
    path = cases.WAVEFORMS / f"{name}.csv"
    if BIN:
        run = subprocess.run([BIN, "eval", "--waveform", str(path), "--json"], capture_output=True, text=True)
        assert run.returncode != 0
        text = run.stderr
    else:
        text = (cases.HERE / "fixtures" / f"{name}.stderr").read_text()
    return re.sub(r"^error: .*?\.csv:\d+:\d+: ", "", text.strip())


@pytest.mark.parametrize("cid,args,call", cases.json_cases(), ids=[c[0] for c in cases.json_cases()])
def test_same_object_as_the_cli(cid, args, call):
    want = cli_json(cid, args)
    got = call(q)
    if isinstance(want, dict):
        assert sorted(got) == sorted(want), "keys differ"
        for key in want:
            assert got[key] == want[key], f"{key}: {got[key]!r} != {want[key]!r}"
    else:
        assert [sorted(g) for g in got] == [sorted(w) for w in want]
        assert got == want


@pytest.mark.parametrize("cid,args,call", cases.export_cases(), ids=[c[0] for c in cases.export_cases()])
def test_export_writes_the_cli_file_byte_for_byte(cid, args, call, tmp_path):
    out = tmp_path / "python.csv"
    result = call(q, out)
    assert out.read_bytes() == cli_file(cid, args, tmp_path)
    # The header carries the caution the command line writes.
    assert q.CAUTION in out.read_text()
    assert result["caution"] == q.CAUTION
    data = [line for line in out.read_text().splitlines() if not line.startswith("#")]
    assert result["rows"] == len(data) - 1  # rows below the column header


def test_sample_is_the_exported_table(tmp_path):
    # Source: `quenchless export ... --columns omega2`, the trap as played (fixture
    # export_two_axes_omega2.csv): sample() must return its rows exactly.
    cid, args, _ = cases.export_cases()[2]
    path = tmp_path / "cli.csv"
    path.write_bytes(cli_file(cid, args, tmp_path))
    t_file, w2_file, _ = cases.read_table(path)
    t, w2 = q.load_study(cases.STUDIES / "tweezer_two_axes.ron")["shortcut 60 us"].sample()
    assert t.dtype == np.float64 and w2.dtype == np.float64
    assert t.tolist() == t_file
    assert w2.tolist() == w2_file


@pytest.mark.parametrize("name", ["bad_nan", "bad_not_increasing", "bad_one_row", "bad_negative_omega"])
def test_bad_arrays_raise_the_cli_message(name):
    t, v, _ = cases.read_table_loose(cases.WAVEFORMS / f"{name}.csv")
    with pytest.raises(ValueError) as e:
        q.evaluate(np.array(t), np.array(v))
    assert str(e.value) == "t_s, omega_rad_s: " + cli_error(name)
