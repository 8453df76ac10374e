"""Type hints of the native module (python/src/lib.rs)."""

from typing import Callable, Dict, List, Optional, Tuple

class Field:
    """The solved field of a case, kept after the solve."""

    def b_at(self, xs: List[float], ys: List[float]) -> List[Tuple[float, float]]:
        """B (T) at points in the case's length unit; NaN outside."""
    def mesh(self) -> Tuple[List[Tuple[float, float]], List[Tuple[int, int, int]], List[int]]:
        """Nodes (case unit), triangles (corner indices), part of each triangle (-1: air)."""

def solve_text(
    text: str, path: str, set: Optional[Dict[str, float]] = None, accuracy: Optional[float] = None
) -> Tuple[str, Optional[str], Field]:
    """Solves a case given as text: results.json's text, the field map (SVG) and the field.
    Raises ValueError with the command line's message for a bad case."""

def run_study(
    text: str,
    path: str,
    out: str,
    set: Optional[Dict[str, float]] = None,
    accuracy: Optional[float] = None,
    force: bool = False,
    progress: Optional[Callable[[str], object]] = None,
) -> int:
    """Runs a case's sweep, seek, tolerance study or optimization into `out`; the exit code."""
