"""Lodestone from Python: solve a permanent-magnet case and read its fields,
pulls, fluxes and design checks, each value with its estimated error.

    >>> import lodestone
    >>> r = lodestone.solve("cases/pot-magnet.toml")
    >>> r.values["force.pull.z"], r.errors["force.pull.z"]

The numbers are the command line's: the same case reader, solver and
results. A case that cannot be read raises :class:`CaseError` with the
command line's message, file, line and column.

Strong magnets pinch and shatter, static fields affect implanted devices,
and magnetized goods have shipping rules: the results are estimates from a
2D model, to be confirmed by measurement and qualified practice.
"""

from __future__ import annotations

import json
import math
import os
import re
from typing import Any, Callable, Dict, List, Mapping, Optional, Sequence, Tuple, Union

import numpy as np

from . import _lodestone

__all__ = ["solve", "sweep", "optimize", "tolerance", "Results", "Study", "CaseError"]


class CaseError(ValueError):
    """A case that cannot be read or solved as written.

    ``message`` is the command line's full message; ``file``, ``line`` and
    ``column`` say where (None where the message names no place).
    """

    def __init__(self, message: str) -> None:
        super().__init__(message)
        self.message = message
        self.file: Optional[str] = None
        self.line: Optional[int] = None
        self.column: Optional[int] = None
        m = re.search(r"-->\s*(.*?):(\d+):(\d+)", message)
        if m:
            self.file, self.line, self.column = m.group(1), int(m.group(2)), int(m.group(3))


CaseLike = Union[str, "os.PathLike[str]", Mapping[str, Any]]


def solve(case: CaseLike, set: Optional[Mapping[str, float]] = None, accuracy: Union[None, str, float] = None) -> "Results":
    """Solve a case and return its :class:`Results`.

    ``case`` is a path to a case file, the text of a case (TOML), or a dict
    of the same tables. ``set`` overrides parameters of ``[params]`` (plain
    numbers, in the units the case uses for them). ``accuracy`` replaces
    ``[study] accuracy``: ``"0.1 %"``, a fraction such as ``1e-3``, or
    ``"off"``, as if the case said it (the default element order and first
    mesh follow it). The GIL is released while the study solves.
    """
    text, path = _case_text(case)
    try:
        answer = _lodestone.solve_text(text, path, dict(set) if set else None, _accuracy(accuracy))
    except ValueError as e:
        raise CaseError(str(e)) from None
    results_json, field_map, field = answer
    return Results(results_json, field_map, field)


class Study:
    """A sweep, optimization or tolerance study run into ``folder``.

    ``code`` is the command line's exit code (0 done, 1 an expectation or
    constraint failed, 3 not converged). ``results`` is the case solved at
    its nominal parameters or at the optimum (values and errors, without
    the field), where the study writes one. ``table`` (sweeps) maps each
    sweep.csv column to a numpy array; ``summary`` holds optimize.json or
    tolerance.json.
    """

    def __init__(self, folder: str, code: int) -> None:
        self.folder = folder
        self.code = code
        self.table: Dict[str, np.ndarray] = {}
        self.summary: Dict[str, Any] = {}
        self.results: Optional[Dict[str, Any]] = None
        csv_path = os.path.join(folder, "sweep.csv")
        if os.path.exists(csv_path):
            import csv

            with open(csv_path, newline="") as f:
                rows = list(csv.reader(f))
            if rows:
                for i, name in enumerate(rows[0]):
                    column = [r[i] for r in rows[1:]]
                    try:
                        self.table[name] = np.asarray([float(c) for c in column])
                    except ValueError:
                        self.table[name] = np.asarray(column)
        for name in ("optimize.json", "tolerance.json"):
            path = os.path.join(folder, name)
            if os.path.exists(path):
                with open(path) as f:
                    self.summary = json.load(f)
        path = os.path.join(folder, "results.json")
        if os.path.exists(path):
            with open(path) as f:
                self.results = json.load(f)

    def __repr__(self) -> str:
        return f"<lodestone.Study in {self.folder}: exit code {self.code}>"


ProgressCallback = Optional[Callable[[str], Any]]


def _run(case: CaseLike, table: str, out: Optional[str], set: Optional[Mapping[str, float]], accuracy: Union[None, str, float], force: bool, progress: ProgressCallback) -> Study:
    text, path = _case_text(case)
    if not re.search(r"^\s*\[" + table + r"\]", text, re.M):
        raise CaseError(f"error: {path}: lodestone.{table}() needs a [{table}] table in the case")
    folder = out if out is not None else __import__("tempfile").mkdtemp(prefix=f"lodestone-{table}-")
    try:
        code = _lodestone.run_study(text, path, folder, dict(set) if set else None, _accuracy(accuracy), force, progress)
    except ValueError as e:
        raise CaseError(str(e)) from None
    return Study(folder, code)


def sweep(case: CaseLike, out: Optional[str] = None, set: Optional[Mapping[str, float]] = None, accuracy: Union[None, str, float] = None, force: bool = False, progress: ProgressCallback = None) -> Study:
    """Run the case's ``[sweep]`` (every variant, on all cores, the GIL
    released) into ``out`` (a new temporary folder by default); variants
    already whole there are not solved again unless ``force``.
    ``progress(line)`` hears each progress line."""
    return _run(case, "sweep", out, set, accuracy, force, progress)


def optimize(case: CaseLike, out: Optional[str] = None, set: Optional[Mapping[str, float]] = None, accuracy: Union[None, str, float] = None, progress: ProgressCallback = None) -> Study:
    """Run the case's ``[optimize]``: ``summary`` is optimize.json
    (``params``, ``values``, ``errors``), ``results`` the case at the
    optimum."""
    return _run(case, "optimize", out, set, accuracy, False, progress)


def tolerance(case: CaseLike, out: Optional[str] = None, set: Optional[Mapping[str, float]] = None, accuracy: Union[None, str, float] = None, force: bool = False, progress: ProgressCallback = None) -> Study:
    """Run the case's ``[tolerance]`` study (samples on all cores, kept in
    ``out`` so that a rerun resumes): ``summary`` is tolerance.json
    (statistics of every value, verdicts on statistics)."""
    return _run(case, "tolerance", out, set, accuracy, force, progress)


def _case_text(case: CaseLike) -> Tuple[str, str]:
    """The case's text and the path that names it in messages."""
    if isinstance(case, Mapping):
        return _to_toml(case), os.path.join(os.getcwd(), "<dict>.toml")
    if isinstance(case, os.PathLike) or (isinstance(case, str) and "\n" not in case and (case.endswith(".toml") or os.path.exists(case))):
        path = os.fspath(case)
        try:
            with open(path, encoding="utf-8") as f:
                return f.read(), path
        except OSError as e:
            raise CaseError(f"error: cannot read the case file {path}: {e.strerror}") from None
        except UnicodeDecodeError:
            raise CaseError(f"error: {path} is not UTF-8 text") from None
    if isinstance(case, str):
        return case, os.path.join(os.getcwd(), "<string>.toml")
    raise TypeError("case must be a path, the text of a case or a dict")


def _accuracy(accuracy: Union[None, str, float]) -> Optional[float]:
    """None (the case's), a fraction, or -1 for "off"."""
    if accuracy is None:
        return None
    what = "accuracy: a fraction from 1e-7 to 0.5, a percentage such as '0.1 %', or 'off'"
    if isinstance(accuracy, str):
        a = accuracy.strip()
        if a == "off":
            return -1.0
        try:
            fraction = float(a[:-1]) / 100.0 if a.endswith("%") else float(a)
        except ValueError:
            raise CaseError(f"error: {what}, not {accuracy!r}") from None
    elif isinstance(accuracy, (int, float)) and not isinstance(accuracy, bool):
        fraction = float(accuracy)
    else:
        raise CaseError(f"error: {what}, not {accuracy!r}")
    if not (1e-7 <= fraction <= 0.5):
        raise CaseError(f"error: {what}, not {accuracy!r}")
    return fraction


# Deeper than any case's tables (a point in an array in an inline table in a
# table is four): a guard against self-referencing or runaway structures,
# which would otherwise end in Python's own RecursionError.
_MAX_DEPTH = 32


def _bad(where: str, why: str) -> CaseError:
    return CaseError(f"error: <dict>: {where}: {why}")


def _toml_string(v: str, where: str) -> str:
    """A TOML basic string: quotes, backslashes and control characters
    escaped, every other character as it is (TOML reads UTF-8; a \\u
    escape cannot carry a character beyond the basic plane, as JSON's
    surrogate pairs try to)."""
    try:
        v.encode("utf-8")
    except UnicodeEncodeError:
        raise _bad(where, "the text is not valid Unicode (a lone surrogate)") from None
    out = []
    for ch in v:
        if ch in '"\\':
            out.append("\\" + ch)
        elif ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def _toml_value(v: Any, where: str, depth: int = 0) -> str:
    if depth > _MAX_DEPTH:
        raise _bad(where, f"nested deeper than {_MAX_DEPTH} levels (a case needs four at most)")
    if isinstance(v, np.generic):
        v = v.item()
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        if not -(2**63) <= v < 2**63:
            raise _bad(where, f"the integer {v} does not fit in 64 bits, the most TOML holds; give it as a float")
        return repr(v)
    if isinstance(v, float):
        if not math.isfinite(v):
            raise _bad(where, f"a case holds finite numbers only, not {v}")
        return repr(v)
    if isinstance(v, str):
        return _toml_string(v, where)
    if isinstance(v, (bytes, bytearray)):
        raise _bad(where, "bytes are not text: decode them to a str first")
    if isinstance(v, Mapping):
        return "{ " + ", ".join(f"{_toml_key(k, where)} = {_toml_value(x, f'{where}[{k!r}]', depth + 1)}" for k, x in v.items()) + " }"
    if isinstance(v, np.ndarray):
        return _toml_value(v.tolist(), where, depth)
    if isinstance(v, Sequence):
        return "[" + ", ".join(_toml_value(x, f"{where}[{i}]", depth + 1) for i, x in enumerate(v)) + "]"
    raise _bad(where, f"cannot write {type(v).__name__} into a case (numbers, strings, booleans, lists and dicts)")


def _toml_key(k: Any, where: str) -> str:
    if not isinstance(k, str):
        raise _bad(where, f"keys are names (strings), not {k!r}")
    return k if re.fullmatch(r"[A-Za-z0-9_-]+", k) else _toml_string(k, where)


def _to_toml(case: Mapping[str, Any]) -> str:
    """A dict of tables as case text: a dict is a table, a list of dicts an
    array of tables ([[part]]), everything else a value. A value that TOML
    cannot hold raises CaseError naming where it sits in the dict."""
    lines: List[str] = []
    for name, body in case.items():
        where = f"case[{name!r}]"
        key = _toml_key(name, where)
        if isinstance(body, Mapping):
            lines.append(f"[{key}]")
            lines += [f"{_toml_key(k, where)} = {_toml_value(v, f'{where}[{k!r}]')}" for k, v in body.items()]
        elif isinstance(body, Sequence) and not isinstance(body, str) and body and all(isinstance(b, Mapping) for b in body):
            for i, b in enumerate(body):
                lines.append(f"[[{key}]]")
                lines += [f"{_toml_key(k, where)} = {_toml_value(v, f'{where}[{i}][{k!r}]')}" for k, v in b.items()]
        else:
            raise _bad(where, "must be a table (dict) or a list of tables")
        lines.append("")
    return "\n".join(lines)


class Results:
    """A solved case.

    ``values`` and ``errors`` are keyed by the value names of ``[[expect]]``
    (SI units; ``errors`` are estimated absolute errors). ``probes[name]``
    holds numpy arrays ``points`` (m, as results.json), ``b`` (T, one row per
    point) and ``b_magnitude``. ``forces`` and ``warnings`` are as in
    results.json, which :meth:`to_json` returns whole.
    """

    def __init__(self, results_json: str, field_map: Optional[str], field: Any) -> None:
        self._json = results_json
        self._data: Dict[str, Any] = json.loads(results_json)
        self._field_map = field_map
        self._field = field
        self.values: Dict[str, float] = dict(self._data.get("values", {}))
        self.errors: Dict[str, float] = dict(self._data.get("errors", {}))
        self.forces: Dict[str, Any] = dict(self._data.get("forces", {}))
        self.warnings: List[str] = list(self._data.get("warnings", []))
        self.cautions: List[str] = list(self._data.get("cautions", []))
        self.probes: Dict[str, Dict[str, np.ndarray]] = {}
        for name, p in self._data.get("probes", {}).items():
            self.probes[name] = {
                "points": np.asarray(p.get("points", []), dtype=float),
                "b": np.asarray(p.get("b", []), dtype=float),
                "b_magnitude": np.asarray(p.get("bmag", []), dtype=float),
            }

    def field(self, x: Union[float, Sequence[float], np.ndarray], y: Union[float, Sequence[float], np.ndarray]) -> np.ndarray:
        """B (T) at points given in the case's length unit: an array of
        shape ``x.shape + (2,)`` holding (Bx, By), or (Br, Bz) about the
        axis; NaN outside the solved region (beyond the open boundary's
        rim, which lies past the parts and the farthest probe: add a probe
        to reach further)."""
        xa, ya = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(y, dtype=float))
        b = self._field.b_at(xa.ravel().tolist(), ya.ravel().tolist())
        return np.asarray(b, dtype=float).reshape(xa.shape + (2,))

    def mesh(self) -> Tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The final mesh: node coordinates (case length unit, shape (n, 2)),
        triangles (corner indices, shape (m, 3)) and each triangle's part
        index (-1 for air)."""
        nodes, triangles, parts = self._field.mesh()
        return np.asarray(nodes, dtype=float), np.asarray(triangles, dtype=np.int64), np.asarray(parts, dtype=np.int64)

    def to_json(self) -> str:
        """results.json's text, as the command line writes it."""
        return self._json

    def __repr__(self) -> str:
        return f"<lodestone.Results: {len(self.values)} values, {len(self.warnings)} warnings>"

    def _repr_html_(self) -> str:
        import html

        rows = "".join(
            f"<tr><td>{html.escape(k)}</td><td>{v:.6g}</td><td>{'' if self.errors.get(k) is None else f'± {self.errors[k]:.2g}'}</td></tr>"
            for k, v in sorted(self.values.items())
        )
        warn = "".join(f"<li>{html.escape(w)}</li>" for w in self.warnings)
        out = f"<div><b>Warnings</b><ul>{warn}</ul></div>" if warn else ""
        out += f"<table><thead><tr><th>value</th><th>SI</th><th>error</th></tr></thead><tbody>{rows}</tbody></table>"
        if self._field_map:
            out += f"<div style='max-width:48rem'>{self._field_map}</div>"
        return out
