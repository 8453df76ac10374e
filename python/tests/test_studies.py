"""lodestone.sweep, optimize and tolerance (issue 24): the command line's
own machinery with the GIL released; results read back from the folder."""

import os
import subprocess
import tempfile

import numpy as np
import pytest

import lodestone

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
BINARY = os.path.join(ROOT, "target", "release", "lodestone")


def disk(extra):
    """A rigid disk magnet and a probe on its axis, with extra tables."""
    case = {
        "study": {"geometry": "axisymmetric", "unit": "mm", "accuracy": "0.1 %"},
        "params": {"kbr": 1.0, "t": 5.0},
        "materials": {"rigid": {"br": "1.2 * kbr T", "mur": 1}},
        "part": [{"name": "m", "material": "rigid", "magnetization": "+z", "rect": {"from": [0, 0], "to": [5, "t"]}}],
        "probe": [{"name": "front", "point": [0, "t + 10"]}],
    }
    case.update(extra)
    return case


@pytest.mark.skipif(not os.path.exists(BINARY), reason="needs target/release/lodestone (cargo build --release)")
def test_sweep_matches_the_command_line():
    case = disk({"sweep": {"t": [2.0, 4.0, 6.0]}})
    lines = []
    study = lodestone.sweep(case, progress=lines.append)
    assert study.code == 0
    assert list(study.table["t"]) == [2.0, 4.0, 6.0]
    b = study.table["probe.front.b [T]"]
    assert np.all(np.diff(b) > 0), b  # a longer magnet gives more field at the same distance from its face
    assert any("variant" in l for l in lines), lines
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "case.toml")
        with open(path, "w") as f:
            f.write(lodestone._to_toml(case))
        subprocess.run([BINARY, "solve", "--quiet", path, "-o", os.path.join(d, "out")], check=True)
        cli = lodestone.Study(os.path.join(d, "out"), 0)
    assert np.array_equal(cli.table["probe.front.b [T]"], b)


def test_tolerance_percentiles_follow_a_uniform_br_spread():
    """The field is linear in Br, so with Br uniform within +-3 % its 1st and
    99th percentiles are the nominal field times 1 -+ 0.03 x 0.98."""
    case = disk({"tolerance": {"method": "monte-carlo", "samples": 40, "spread": {"kbr": {"plus_minus": "3 %"}}}})
    study = lodestone.tolerance(case)
    assert study.code == 0
    s = study.summary["statistics"]["probe.front.b"]
    nominal = study.results["values"]["probe.front.b"]
    assert abs(s["p1"] / (nominal * (1 - 0.03 * 0.98)) - 1) < 5e-3
    assert abs(s["p99"] / (nominal * (1 + 0.03 * 0.98)) - 1) < 5e-3


def test_optimize_returns_the_optimum_and_a_missing_table_is_an_error():
    case = disk({"optimize": {"maximize": "probe.front.bz", "vary": {"t": [1, 10]}, "max_evaluations": 12, "accuracy": "0.5 %"}})
    study = lodestone.optimize(case)
    assert study.code == 0
    assert study.summary["feasible"] is True
    # The field 10 mm in front of the face grows with the magnet's length.
    assert study.summary["params"]["t"] > 8.0
    with pytest.raises(lodestone.CaseError):
        lodestone.optimize(disk({}))
