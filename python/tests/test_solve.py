"""The Python package against the command line on the example cases
(issue 24): the same values, digit for digit, since both run the same
machinery; CaseError with line and column; fields and the mesh."""

import json
import math
import os
import subprocess
import tempfile

import numpy as np
import pytest

import lodestone

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
CASES = os.path.join(ROOT, "cases")
BINARY = os.path.join(ROOT, "target", "release", "lodestone")


def cli_values(case):
    """values of results.json from `lodestone solve` on a case."""
    with tempfile.TemporaryDirectory() as out:
        subprocess.run([BINARY, "solve", "--quiet", case, "-o", out], check=False, capture_output=True)
        with open(os.path.join(out, "results.json")) as f:
            return json.load(f)["values"]


@pytest.mark.skipif(not os.path.exists(BINARY), reason="needs target/release/lodestone (cargo build --release)")
@pytest.mark.parametrize("name", ["pot-magnet.toml", "magnet-bare.toml", "sensor-bias-concentrator.toml"])
def test_values_equal_the_command_lines(name):
    case = os.path.join(CASES, name)
    r = lodestone.solve(case)
    cli = cli_values(case)
    assert set(cli) == set(r.values)
    for k, v in cli.items():
        assert r.values[k] == v or math.isclose(r.values[k], v, rel_tol=1e-12, abs_tol=1e-300), k


def test_pot_magnet_pull_has_its_error():
    r = lodestone.solve(os.path.join(CASES, "pot-magnet.toml"))
    pull = r.values["force.pull.z"]
    assert pull < -100.0  # the case's own expectation
    assert 0.0 < r.errors["force.pull.z"] < 1e-3 * abs(pull)
    assert "pull" in r.forces


def test_a_bad_case_raises_case_error_with_line_and_column():
    text = '[study]\ngeometry = "axisymmetric"\n[[part]]\nname = "m"\nmaterial = "N55"\nmagnetization = "+z"\nrect = { from = [0, 0], to = [5, 5] }\n'
    with pytest.raises(lodestone.CaseError) as e:
        lodestone.solve(text)
    assert e.value.line == 5 and e.value.column == 12, e.value.message
    assert "N35 to N52" in e.value.message


def test_a_dict_case_probes_and_the_field_anywhere():
    """A rigid disk: the field on its axis against the closed form of a
    uniformly magnetized cylinder (Derby and Olbert, Am. J. Phys. 78, 2010)."""
    case = {
        "study": {"geometry": "axisymmetric", "unit": "mm"},
        "materials": {"rigid": {"br": "1.2 T", "mur": 1}},
        "part": [{"name": "m", "material": "rigid", "magnetization": "+z", "rect": {"from": [0, 0], "to": [5, 5]}}],
        "probe": [{"name": "axis", "line": {"from": [0, 10], "to": [0, 30], "points": 5}}],
    }
    r = lodestone.solve(case, accuracy="0.01 %")
    p = r.probes["axis"]
    assert p["points"].shape == (5, 2) and p["b"].shape == (5, 2)
    z = np.array([5.0, 10.0, 15.0, 20.0, 25.0])
    exact = 0.6 * ((z + 5) / np.hypot(z + 5, 5) - z / np.hypot(z, 5))
    assert np.allclose(p["b"][:, 1], exact, rtol=1e-3)
    b = r.field([0.0, 0.0], [10.0, 30.0])
    assert b.shape == (2, 2)
    assert np.allclose(b[:, 1], exact[[0, 4]], rtol=1e-3)
    assert np.isnan(r.field(1e6, 0.0)).all()
    nodes, triangles, parts = r.mesh()
    assert nodes.shape[1] == 2 and triangles.shape[1] == 3 and len(parts) == len(triangles)
    assert json.loads(r.to_json())["values"] == r.values
    assert "<table>" in r._repr_html_()


def test_set_overrides_a_parameter():
    case = os.path.join(CASES, "pot-magnet.toml")
    near = lodestone.solve(case, set={"gap": 0.5}, accuracy="off")
    far = lodestone.solve(case, set={"gap": 3.0}, accuracy="off")
    assert near.values["force.pull.z"] < far.values["force.pull.z"] < 0.0
    with pytest.raises(lodestone.CaseError):
        lodestone.solve(case, set={"nope": 1.0})


def small_disk(**study):
    return {
        "study": {"geometry": "axisymmetric", "unit": "mm", **study},
        "part": [{"name": "m", "material": "N42", "magnetization": "+z", "rect": {"from": [0, 0], "to": [5, 5]}}],
    }


def test_a_dict_case_carries_any_text():
    """Text beyond the basic plane, quotes and backslashes reach the case
    as written (JSON's escapes had sent the emoji as a surrogate pair, which
    TOML refuses)."""
    title = 'Rückplatte 😀 "top" \\ 2'
    r = lodestone.solve(small_disk(title=title), accuracy="1 %")
    assert json.loads(r.to_json())["study"]["title"] == title


def test_what_a_case_cannot_hold_raises_case_error_where_it_sits():
    deep = []
    inner = deep
    for _ in range(100):
        inner.append([])
        inner = inner[0]
    bad = [
        (("part", 0, "rect", "to"), [float("nan"), 5], "finite numbers only", "case['part'][0]['rect']['to'][0]"),
        (("part", 0, "rect", "to"), [10**30, 5], "does not fit in 64 bits", "case['part'][0]['rect']['to'][0]"),
        (("part", 0, "rect"), None, "cannot write NoneType", "case['part'][0]['rect']"),
        (("part", 0, "name"), b"m", "bytes are not text", "case['part'][0]['name']"),
        (("part", 0, "name"), "m\ud800", "lone surrogate", "case['part'][0]['name']"),
        (("part", 0, "extra"), deep, "nested deeper than", "case['part'][0]['extra'][0]"),
    ]
    for keys, value, why, where in bad:
        case = small_disk()
        holder = case
        for k in keys[:-1]:
            holder = holder[k]
        holder[keys[-1]] = value
        with pytest.raises(lodestone.CaseError) as e:
            lodestone.solve(case)
        assert why in e.value.message and where in e.value.message, e.value.message
    case = small_disk()
    case["study"][3] = "x"
    with pytest.raises(lodestone.CaseError, match="keys are names"):
        lodestone.solve(case)
    for accuracy in ["abc", "5000 %", 0.0, True]:
        with pytest.raises(lodestone.CaseError, match="accuracy"):
            lodestone.solve(small_disk(), accuracy=accuracy)
