"""Writes the command line's outputs of every case in cases.py to fixtures/.

    QUENCHLESS_BIN=/path/to/quenchless python crates/python/tests/make_fixtures.py

Run from any directory; the commands run from the repository root, with paths
relative to it, so the fixtures hold no machine's paths.
"""

import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import cases  # noqa: E402

OUT = cases.HERE / "fixtures"


def main():
    binary = os.environ.get("QUENCHLESS_BIN")
    if not binary:
        sys.exit("set QUENCHLESS_BIN to the quenchless binary")
    lines = []
    for cid, args, _ in cases.json_cases():
        rel = cases.relative(args)
        out = subprocess.run([binary, *rel], cwd=cases.REPO, check=True, capture_output=True, text=True).stdout
        json.loads(out)
        (OUT / f"{cid}.json").write_text(out)
        lines.append(f"- `{cid}.json`: `quenchless {' '.join(_quoted(a) for a in rel)}`")
    for cid, args, _ in cases.export_cases():
        rel = cases.relative(args)
        with tempfile.TemporaryDirectory() as d:
            target = Path(d) / "out.csv"
            subprocess.run([binary, *rel, "--out", str(target)], cwd=cases.REPO, check=True, capture_output=True)
            (OUT / f"{cid}.csv").write_bytes(target.read_bytes())
        lines.append(f"- `{cid}.csv`: `quenchless {' '.join(_quoted(a) for a in rel)} --out {cid}.csv`")
    for path in sorted(cases.WAVEFORMS.glob("bad_*.csv")):
        rel = cases.relative(["eval", "--waveform", str(path), "--json"])
        run = subprocess.run([binary, *rel], cwd=cases.REPO, capture_output=True, text=True)
        assert run.returncode != 0, f"{path.name}: the command line accepted it"
        (OUT / f"{path.stem}.stderr").write_text(run.stderr)
        lines.append(f"- `{path.stem}.stderr`: the stderr of `quenchless {' '.join(rel)}`")
    print("\n".join(lines))


def _quoted(a):
    return f'"{a}"' if " " in a else a


if __name__ == "__main__":
    main()
