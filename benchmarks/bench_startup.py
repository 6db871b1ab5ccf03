"""CLI start-up: ``kitbin --help`` against the ``--help`` of a minimal Typer app.

Both run as fresh interpreters, interleaved, and the median of each is compared, so
machine noise hits both sides alike. Target: ratio <= 1.3.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

MINIMAL_APP = '''
import typer
app = typer.Typer(add_completion=False)
@app.command()
def hello(name: str = "x") -> None:
    """Say hello."""
    print(name)
@app.command()
def bye() -> None:
    """Say bye."""
app()
'''


def _time(argv: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(argv, check=True, capture_output=True)
    return time.perf_counter() - start


def run(repeats: int = 15) -> dict:
    """Measure both start-ups; returns medians in seconds and their ratio."""
    with tempfile.TemporaryDirectory() as tmp:
        minimal = Path(tmp) / "minimal_app.py"
        minimal.write_text(MINIMAL_APP)
        ours = [sys.executable, "-m", "kitbin", "--help"]
        theirs = [sys.executable, str(minimal), "--help"]
        _time(ours), _time(theirs)  # warm the page cache and .pyc files
        kitbin_s, typer_s = [], []
        for _ in range(repeats):
            kitbin_s.append(_time(ours))
            typer_s.append(_time(theirs))
    k, t = statistics.median(kitbin_s), statistics.median(typer_s)
    return {
        "kitbin_help_s": round(k, 4),
        "minimal_typer_help_s": round(t, 4),
        "ratio": round(k / t, 3),
        "target_ratio_max": 1.3,
    }


if __name__ == "__main__":
    import json

    print(json.dumps(run(), indent=2))
