"""A small hand-made inventory and plan for the match and pick CLI tests.

The plan is a buck from 12 V to 5 V at 1 A, 500 kHz, reference 0.800 V ±1 %, switch
current limit 1.8 A. Its numbers are worked in the tests that use them.
"""

from __future__ import annotations

from pathlib import Path

from typer.testing import CliRunner

from kitbin.cli.app import app

PLAN = ["plan", "new", "bench-5v", "--topology", "buck", "--vin", "12V", "--vout", "5V",
        "--iout", "1A", "--fsw", "500kHz", "--vf", "0.4V", "--vref", "0.8V",
        "--vref-tol", "1%", "--ilim", "1.8A", "--ton-min", "100ns", "--d-max", "90%"]  # fmt: skip

BINS = [
    # inductors: L-A verified; L-B only a lower-bound Isat below its need; L-E too small
    ["bin", "add", "L-A", "--kind", "inductor", "--nominal", "22uH", "--tolerance", "20%",
     "--marking", "220", "--package", "8x8 drum", "--location", "drawer 1"],
    ["bin", "add", "L-B", "--kind", "inductor", "--nominal", "33uH", "--tolerance", "20%",
     "--location", "drawer 1"],
    ["bin", "add", "L-E", "--kind", "inductor", "--nominal", "10uH", "--tolerance", "20%",
     "--location", "drawer 1"],
    ["bin", "add", "C-OUT", "--kind", "capacitor", "--nominal", "22uF", "--tolerance", "20%",
     "--prop", "rated_voltage=25V", "--prop", "i_ripple=2A", "--location", "drawer 2"],
    ["bin", "add", "C-IN", "--kind", "capacitor", "--nominal", "10uF", "--tolerance", "10%",
     "--prop", "rated_voltage=50V", "--prop", "i_ripple=2A", "--location", "drawer 2"],
    ["bin", "add", "D-1", "--kind", "diode", "--prop", "vrrm=40V", "--prop", "if_avg=3A",
     "--prop", "if_peak=10A", "--prop", "rated_power=1W", "--location", "drawer 3"],
    ["bin", "add", "U-1", "--kind", "controller", "--prop", "vref=0.8V", "--prop",
     "fsw=500kHz", "--prop", "ilim=1.8A", "--prop", "vin_min=4.5V", "--prop", "vin_max=28V",
     "--prop", "d_max=90%", "--prop", "ton_min=100ns", "--location", "tube"],
    ["bin", "add", "R-TOP", "--kind", "resistor", "--nominal", "52.3k", "--tolerance", "1%",
     "--location", "book p1"],
    ["bin", "add", "R-BOT", "--kind", "resistor", "--nominal", "10k", "--tolerance", "1%",
     "--location", "book p2"],
    ["bin", "add", "R-X", "--kind", "resistor", "--nominal", "47k", "--tolerance", "5%",
     "--location", "book p3"],
]  # fmt: skip

RECORDS = [
    ["record", "L-A", "inductance=22uH", "dcr=50mohm", "isat_20=2.4A", "i_rise=2.5A"],
    ["record", "L-B", "inductance=33uH", "dcr=80mohm", "isat_20>=1.2A"],
    ["record", "L-E", "inductance=10uH", "dcr=30mohm", "isat_20=5A"],
    ["record", "C-OUT", "capacitance=18uF", "esr=5mohm"],
    ["record", "C-IN", "capacitance=9uF", "esr=8mohm"],
    ["record", "R-TOP", "resistance=52.5k"],
    ["record", "R-BOT", "resistance=10.0k"],
]
STOCK = [["stock", label, "10", "--why", "counted"]
         for label in ("L-A", "L-B", "L-E", "C-OUT", "C-IN", "D-1", "U-1", "R-TOP", "R-BOT",
                       "R-X")]  # fmt: skip


def kb(db: Path, *args: str):
    """Run ``kitbin --db DB ARGS...`` in-process."""
    return CliRunner().invoke(app, ["--db", str(db), *args])


def build(db: Path) -> None:
    """Create the inventory and the plan ``bench-5v``."""
    for cmd in (*BINS, *RECORDS, *STOCK, PLAN):
        r = kb(db, *cmd)
        assert r.exit_code == 0, (cmd, r.output)


def copy_of(template: Path, target: Path) -> Path:
    """A copy of a built database (its WAL side files too, if any are left)."""
    import shutil

    for suffix in ("", "-wal", "-shm"):
        src = Path(str(template) + suffix)
        if src.exists():
            shutil.copy(src, Path(str(target) + suffix))
    return target


def query(db: Path, sql: str, *args: object) -> list[tuple]:
    """Rows of one SQL statement, read with the standard library's sqlite3."""
    import sqlite3

    con = sqlite3.connect(db)
    try:
        return con.execute(sql, args).fetchall()
    finally:
        con.close()


def stock_of(db: Path) -> dict[str, tuple[int, int]]:
    """Label -> (on hand, reserved) of every bin."""
    return {lab: (q, r) for lab, q, r in query(db, "SELECT label, qty, qty_reserved FROM bin")}
