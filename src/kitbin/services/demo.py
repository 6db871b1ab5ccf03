"""The demo workshop: build an invented inventory and give a short tour of it.

``kitbin demo`` builds the Harbour Lane Makerspace (invented) from
``kitbin/demo/workshop.toml`` into its own database (``user_data_dir/demo.sqlite``),
never the user's inventory unless ``--db`` names it. Readings are generated from
the file's "true" values with a seeded generator, so every build is identical.

Both the build and the tour are lists of steps, so later parts of kitbin can add
theirs (bench captures, a plan, a pick list) without touching the ones here::

    from kitbin.services import demo
    demo.BUILD_STEPS.append(my_build_step)   # (store, workshop, rng) -> None
    demo.TOUR_STEPS.append(my_tour_step)     # (store) -> TourSection | None
"""

from __future__ import annotations

import datetime as dt
import math
import random
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from kitbin.errors import StoreError
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES
from kitbin.services import inputs
from kitbin.services.picking import demo_build_plan, tour_match_and_pick
from kitbin.store import Store, queries
from kitbin.store.models import Bin, BinProperty, Kit, Reading
from kitbin.store.stock import move_stock


@dataclass
class TourSection:
    """One paragraph of the tour: a title and its lines (plain text)."""

    title: str
    lines: list[str] = field(default_factory=list)


@dataclass
class DemoResult:
    """What ``build_demo`` made: where, how much, and the tour."""

    url: str
    counts: dict[str, int]
    sections: list[TourSection]


BuildStep = Callable[[Store, dict[str, Any], random.Random], None]
TourStep = Callable[[Store], "TourSection | None"]


# -- building ----------------------------------------------------------------------


class _Clock:
    """Deterministic reading times: a fixed start, a few minutes per reading group."""

    def __init__(self, start: dt.datetime) -> None:
        self.now = start

    def tick(self, minutes: int = 6) -> dt.datetime:
        self.now += dt.timedelta(minutes=minutes)
        return self.now


def _sig(value: float, digits: int = 4) -> float:
    """Round to a number of significant digits, as an instrument display would."""
    if value == 0 or not math.isfinite(value):
        return value
    return round(value, digits - 1 - math.floor(math.log10(abs(value))))


def _reading(b: Bin, quantity: str, value: float, when: dt.datetime, **kw: Any) -> Reading:
    return Reading(
        bin=b,
        quantity=quantity,
        value=_sig(value),
        bound=kw.get("bound", "="),
        specimen=kw.get("specimen"),
        conditions=kw.get("conditions", {}),
        method=kw.get("method"),
        instrument=kw.get("instrument", "club bench meter (invented)"),
        taken_at=when,
        note=kw.get("note"),
    )


def _props(b: Bin, props: dict[str, str], source: str) -> None:
    for name, text in props.items():
        quantity, value = inputs.parse_property(f"{name}={text}")
        b.properties.append(BinProperty(name=quantity, value=value, source=source))


def _build_inductors(session, spec, kits, rng: random.Random, clock: _Clock) -> None:
    from kitbin.markings import decode_marking

    unmeasured = {float(v) for v in spec.get("unmeasured", [])}
    estimated = {float(v) for v in spec.get("estimated_isat", [])}
    ramp_limit = 3.0  # A: the demo bench supply's current ramp ends here
    for i, (uh, marking, qty) in enumerate(
        zip(spec["values_uh"], spec["markings"], spec["qty"], strict=True)
    ):
        nominal = decode_marking(marking, "inductor").value
        assert math.isclose(nominal, uh * 1e-6, rel_tol=1e-9), marking
        b = Bin(
            label=f"L-{spec['first_label'] + i:02d}",
            kind="inductor",
            kit=kits[spec["kit"]],
            nominal=nominal,
            tol_minus=spec["tolerance"],
            tol_plus=spec["tolerance"],
            marking=marking,
            package=spec["package"],
            location=spec["location"],
            qty=0,
            qty_reserved=0,
        )
        session.add(b)
        session.flush()
        move_stock(session, b.id, qty, "counted when the kit arrived")
        scale = nominal / 10e-6
        isat_true = spec["isat_at_10uh"] / math.sqrt(scale) * rng.uniform(0.9, 1.1)
        if float(uh) in estimated:
            b.properties.append(
                BinProperty(name="isat_20", value=_sig(isat_true, 2), source="estimate")
            )
        if float(uh) in unmeasured:
            continue
        l_true = nominal * rng.uniform(0.86, 1.06)
        dcr_true = spec["dcr_at_10uh"] * scale * rng.uniform(0.92, 1.08)
        for s in range(1, spec["specimens"] + 1):
            when = clock.tick()
            lcr = {"freq": 100e3, "temp": 23.0}
            session.add(
                _reading(
                    b,
                    "inductance",
                    l_true * (1 + rng.gauss(0, 0.015)),
                    when,
                    specimen=s,
                    conditions=lcr,
                    method="lcr",
                )
            )
            session.add(
                _reading(
                    b,
                    "dcr",
                    dcr_true * (1 + rng.gauss(0, 0.02)),
                    when,
                    specimen=s,
                    conditions={"temp": 23.0},
                    method="4wire",
                )
            )
            if s <= 2 and float(uh) not in estimated:
                isat = isat_true * (1 + rng.gauss(0, 0.03))
                bound = "=" if isat < ramp_limit else ">="
                session.add(
                    _reading(
                        b,
                        "isat_20",
                        isat if bound == "=" else ramp_limit,
                        when,
                        specimen=s,
                        bound=bound,
                        conditions={"temp": 23.0},
                        method="ramp",
                        note=None if bound == "=" else "no 20 % drop up to the end of the ramp",
                    )
                )


def _build_resistors(session, spec, kits, rng: random.Random, clock: _Clock) -> None:
    from kitbin.markings import encode_marking, encode_rkm, series_values

    power = inputs.parse_value("rated_power", spec["rated_power"])
    values = series_values(spec["series"], spec["low"], spec["high"])
    for i, value in enumerate(values):
        code = encode_rkm(value, "resistor")
        b = Bin(
            label=f"R-{code}",
            kind="resistor",
            kit=kits[spec["kit"]],
            nominal=value,
            tol_minus=spec["tolerance"],
            tol_plus=spec["tolerance"],
            marking=encode_marking(value, "resistor", "colour", tolerance=spec["tolerance"]),
            package="axial 1/4 W",
            location=f"{spec['location']}, page {1 + i // 12}",
            qty=0,
            qty_reserved=0,
        )
        b.properties.append(BinProperty(name="rated_power", value=power, source="listing"))
        session.add(b)
        session.flush()
        move_stock(session, b.id, spec["qty"] + rng.randrange(-10, 11), "counted")
        if i % spec["measured_every"] == 0:
            true = value * rng.uniform(0.975, 1.02)
            for s in range(1, spec["specimens"] + 1):
                session.add(
                    _reading(
                        b,
                        "resistance",
                        true * (1 + rng.gauss(0, 0.004)),
                        clock.tick(2),
                        specimen=s,
                        conditions={"temp": 23.0},
                        method="dmm",
                    )
                )


_PROP_SOURCE = {"capacitor": "listing", "diode": "bag label", "controller": "datasheet"}


def _build_bin(session, spec, kits, rng: random.Random, clock: _Clock) -> None:
    from kitbin.markings import decode_marking

    kind = spec["kind"]
    nominal = tol = None
    if spec.get("marking") and kind in NOMINAL_QUANTITY:
        m = decode_marking(spec["marking"], kind)
        nominal, tol = m.value, m.tol_minus
    b = Bin(
        label=spec["label"],
        kind=kind,
        kit=kits[spec["kit"]] if spec.get("kit") else None,
        nominal=nominal,
        tol_minus=tol,
        tol_plus=tol,
        marking=spec.get("marking"),
        package=spec.get("package"),
        location=spec.get("location"),
        notes=spec.get("notes"),
        qty=0,
        qty_reserved=0,
    )
    _props(b, spec.get("props", {}), _PROP_SOURCE.get(kind, "listing"))
    session.add(b)
    session.flush()
    move_stock(session, b.id, spec["qty"], "counted")
    for plan in spec.get("readings", []):
        quantity = plan["quantity"]
        if "true" in plan:
            base = nominal * plan["true"]
        else:
            base = inputs.parse_value(quantity, plan["value"])
        conditions = inputs.parse_conditions([f"{k}={v}" for k, v in plan.get("at", {}).items()])
        for s in range(1, plan["specimens"] + 1):
            session.add(
                _reading(
                    b,
                    quantity,
                    base * (1 + rng.gauss(0, plan["spread"])),
                    clock.tick(3),
                    specimen=s,
                    conditions=conditions,
                    method=plan.get("method"),
                )
            )


def build_inventory(store: Store, workshop: dict[str, Any], rng: random.Random) -> None:
    """Build step: kits, bins, readings and stock moves from the workshop file."""
    clock = _Clock(workshop["workshop"]["first_reading"])
    with store.transaction() as session:
        kits = {}
        for spec in workshop["kit"]:
            kit = Kit(
                name=spec["name"],
                source=spec.get("source"),
                bought_on=spec.get("bought_on"),
                notes=spec.get("notes"),
            )
            session.add(kit)
            kits[kit.name] = kit
        for spec in workshop.get("inductor_series", []):
            _build_inductors(session, spec, kits, rng, clock)
        for spec in workshop.get("resistor_series", []):
            _build_resistors(session, spec, kits, rng, clock)
        for spec in workshop.get("bin", []):
            _build_bin(session, spec, kits, rng, clock)
        session.flush()
        ids = queries.bin_ids_by_label(session)
        for spec in workshop.get("move", []):
            move_stock(session, ids[spec["label"]], spec["delta"], spec["reason"])


def build_bench_captures(store: Store, workshop: dict[str, Any], rng: random.Random) -> None:
    """Build step: the bench captures, when the bench service provides them."""
    try:
        from kitbin.services import bench
    except ImportError:
        return
    import importlib.util

    loader = getattr(bench, "load_demo_captures", None)
    folder = getattr(bench, "DEMO_CAPTURES", "kitbin.demo.captures")
    if loader is not None and importlib.util.find_spec(folder) is not None:
        loader(store)


#: Steps run in order on the fresh demo database; append to add more.
BUILD_STEPS: list[BuildStep] = [build_inventory, build_bench_captures, demo_build_plan]


# -- the tour ----------------------------------------------------------------------


def _fmt(value: float | None, quantity: str) -> str:
    from kitbin.units import format_quantity

    if value is None:
        return "?"
    return format_quantity(value, QUANTITIES[quantity].dimension)


def tour_intro(store: Store) -> TourSection:
    """Tour step: what this is (invented) and where it lives."""
    from kitbin.demo import load_workshop

    w = load_workshop()["workshop"]
    return TourSection(
        f"{w['name']} (invented demo workshop)",
        [
            w["note"],
            f"Database: {store.masked_url}",
            "Before measuring real parts, read docs/safety.md: hot windings, charged "
            "capacitors, scope ground clips, mains supplies.",
        ],
    )


def tour_shelf(store: Store) -> TourSection:
    """Tour step: kits and what the shelf holds."""
    from kitbin.services import inventory

    kits = inventory.list_kits(store)
    with store.transaction() as session:
        counts = queries.counts(session)
        loose = sum(1 for b in queries.bins(session) if b.kit_id is None)
    lines = [f"{k['name']}: {k['bins']} bins" for k in kits]
    lines.append(f"loose bins (no kit): {loose}")
    lines.append(
        f"{counts['bin']} bins holding {counts['parts']} parts; {counts['reading']} readings, "
        f"{counts['capture']} captures, {counts['stock_move']} stock moves"
    )
    return TourSection("The shelf", lines)


def tour_evidence(store: Store) -> TourSection:
    """Tour step: how well the inductors are known (evidence grades for Isat)."""
    from kitbin.services import inventory

    with store.transaction() as session:
        bins = queries.bins(session, kind="inductor", with_readings=True)
        grades: dict[str, list[str]] = {}
        for b in bins:
            ev = inventory.bin_evidence(b, ["isat_20"])["isat_20"]
            grades.setdefault(ev.grade, []).append(b.label)
    lines = [
        f"{grade}: {len(labels)} ({', '.join(labels[:6])}{', ...' if len(labels) > 6 else ''})"
        for grade, labels in sorted(grades.items())
    ]
    lines.append("A matcher uses the worst end of each interval and says which grade it used.")
    return TourSection("Inductor saturation current (Isat at 20 % drop): evidence", lines)


def tour_bin(store: Store, label: str = "L-05") -> TourSection | None:
    """Tour step: one bin in detail."""
    from kitbin.errors import NotFoundError
    from kitbin.services import inventory

    try:
        data = inventory.show_bin(store, label)
    except NotFoundError:
        return None
    tol = data["tol_minus"]
    head = (
        f"{data['label']}: {data['kind']} {_fmt(data['nominal'], 'inductance')}"
        + (f" ±{100 * tol:g} %" if tol else "")
        + f", marked {data['marking']}, {data['package']}, {data['location']}, "
        f"{data['qty']} on hand"
    )
    lines = [head, *(ev["text"] for ev in data["evidence"].values())]
    return TourSection(f"One bin: kitbin bin show {label}", lines)


def captures_folder(url: str) -> Path:
    """Where ``kitbin demo`` puts copies of its capture files: ``demo-captures`` beside
    a SQLite demo file, else in the user data directory."""
    from kitbin.store.locate import sqlite_path

    path = sqlite_path(url)
    if path is not None:
        return Path(path).parent / "demo-captures"
    import platformdirs

    return Path(platformdirs.user_data_dir("kitbin")) / "demo-captures"


def tour_next(store: Store) -> TourSection:
    """Tour step: commands to try next, including a capture analysis."""
    from kitbin.store.locate import sqlite_path

    path = sqlite_path(store.url)
    db = f"--db {path if path is not None else store.masked_url} "
    ramp = captures_folder(store.url) / "L-05_switching_ramps.csv"
    return TourSection(
        "Try",
        [
            f"kitbin {db}bin list --kind inductor",
            f"kitbin {db}bin show L-12",
            f"kitbin {db}bin show U-01 --json",
            f"kitbin {db}ramp {ramp} --bin L-05 --sense 0.1ohm --vl 9V --r-loop 0.25ohm",
            f"kitbin {db}ui",
            f"(the demo's invented capture files are in {ramp.parent})",
        ],
    )


#: Steps of the tour, in order; a step may return None to say nothing.
TOUR_STEPS: list[TourStep] = [
    tour_intro,
    tour_shelf,
    tour_bin,
    tour_evidence,
    tour_match_and_pick,
    tour_next,
]


def tour(store: Store) -> list[TourSection]:
    """Run every tour step on a store."""
    sections = []
    for step in TOUR_STEPS:
        section = step(store)
        if section is not None:
            sections.append(section)
    return sections


# -- entry point -------------------------------------------------------------------


def build_demo(db: str | None = None, *, force: bool = False) -> DemoResult:
    """Build a fresh demo database and return the tour.

    Parameters
    ----------
    db
        Where to build it; None means the demo's own file in the user data
        directory (rebuilt every time). A database named here that already holds
        data is refused unless ``force`` is given.
    force
        Wipe the named database first.

    Raises
    ------
    StoreError
        When ``db`` names a database that holds data and ``force`` is not given.
    """
    from kitbin.demo import copy_captures, load_workshop
    from kitbin.store import engine as store_engine
    from kitbin.store.locate import demo_url, mask_url, resolve_url

    url = resolve_url(db) if db else demo_url()
    if db and not force and store_engine.has_data(url):
        raise StoreError(
            f"{mask_url(url)} already holds data; the demo will not overwrite it",
            "give --force to wipe it, or leave out --db to use the demo's own file",
        )
    store_engine.reset_database(url)
    workshop = load_workshop()
    rng = random.Random(workshop["workshop"]["seed"])
    with store_engine.open_store(url) as store:
        for step in BUILD_STEPS:
            step(store, workshop, rng)
        with store.transaction() as session:
            counts = queries.counts(session)
        copy_captures(captures_folder(url))
        return DemoResult(store.masked_url, counts, tour(store))
