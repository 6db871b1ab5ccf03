"""Start-up hygiene: `kitbin --help` and the pure layers load no heavy module.

A static import graph cannot show that an import is deferred, so each check runs in
a fresh interpreter and inspects ``sys.modules``.
"""

import json
import subprocess
import sys

import pytest

HEAVY = ["pandas", "scipy", "sqlalchemy", "textual", "pint", "matplotlib", "alembic", "psycopg"]


def _loaded_after(code: str) -> set[str]:
    probe = (
        code
        + "\nimport json, sys\nprint(json.dumps(sorted({m.split('.')[0] for m in sys.modules})))"
    )

    out = subprocess.run(
        [sys.executable, "-c", probe], capture_output=True, text=True, check=True, timeout=60
    )
    return set(json.loads(out.stdout.strip().splitlines()[-1]))


def test_help_loads_no_heavy_module() -> None:
    loaded = _loaded_after(
        "import contextlib, io\n"
        "from kitbin.cli.app import app\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    try:\n"
        "        app(['--help'], standalone_mode=False)\n"
        "    except SystemExit:\n"
        "        pass\n"
    )
    heavy = {*HEAVY, "numpy"}
    assert loaded.isdisjoint(heavy), sorted(loaded & heavy)


@pytest.mark.parametrize("package", ["kitbin.stage", "kitbin.measure", "kitbin.match"])
def test_pure_layers_load_no_storage_or_front_end(package: str) -> None:
    loaded = _loaded_after(f"import {package}")
    assert loaded.isdisjoint({"sqlalchemy", "textual", "typer", "alembic", "psycopg", "rich"})


def test_units_and_markings_do_not_build_the_pint_registry_on_import() -> None:
    loaded = _loaded_after("import kitbin.units, kitbin.markings, kitbin.quantities")
    assert "pint" not in loaded
