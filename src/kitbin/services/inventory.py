"""Inventory work: kits, bins, readings and stock, for the command line and the UI.

Every function takes an open :class:`kitbin.store.Store`, runs one unit of work
and returns plain dicts ready for ``--json`` (SI floats; times as ISO 8601 text;
nan and infinity as ``null``). Bad input raises a :class:`kitbin.errors.KitbinError`
before or inside the transaction, so nothing is half written.
"""

from __future__ import annotations

import datetime as dt
import math
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING, Any

from kitbin.errors import KitbinError, NotFoundError, QuantityError
from kitbin.quantities import NOMINAL_QUANTITY, QUANTITIES
from kitbin.services import inputs
from kitbin.store import Store, queries
from kitbin.store.models import Bin, BinProperty, Capture, Kit, Reading
from kitbin.store.stock import move_stock

if TYPE_CHECKING:
    from sqlalchemy.orm import Session

#: Quantities shown as evidence for every bin of a kind, even when nothing is known.
KEY_QUANTITIES: dict[str, tuple[str, ...]] = {
    "inductor": ("inductance", "dcr", "isat_20"),
    "resistor": ("resistance",),
    "capacitor": ("capacitance", "rated_voltage"),
    "diode": ("vrrm", "if_avg", "vf"),
    "controller": ("vref", "fsw"),
    "other": (),
}


# -- shapes returned ---------------------------------------------------------------


def _num(value: float | None) -> float | None:
    """A float for JSON: None for None, nan and infinity."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def _when(value: dt.datetime | dt.date | None) -> str | None:
    return value.isoformat() if value is not None else None


def kit_dict(kit: Kit, bins: int | None = None) -> dict[str, Any]:
    """A kit as a plain dict (keys: name, source, bought_on, notes, bins)."""
    return {
        "name": kit.name,
        "source": kit.source,
        "bought_on": _when(kit.bought_on),
        "notes": kit.notes,
        "bins": bins,
    }


def bin_dict(b: Bin, readings: int | None = None) -> dict[str, Any]:
    """A bin as a plain dict (the keys of ``kitbin bin list --json``)."""
    return {
        "label": b.label,
        "kind": b.kind,
        "kit": b.kit.name if b.kit is not None else None,
        "nominal": _num(b.nominal),
        "nominal_quantity": NOMINAL_QUANTITY.get(b.kind),
        "tol_minus": _num(b.tol_minus),
        "tol_plus": _num(b.tol_plus),
        "marking": b.marking,
        "package": b.package,
        "location": b.location,
        "qty": b.qty,
        "qty_reserved": b.qty_reserved,
        "qty_free": b.qty - b.qty_reserved,
        "notes": b.notes,
        "properties": [
            {"name": p.name, "value": _num(p.value), "source": p.source} for p in b.properties
        ],
        "readings": readings,
    }


def reading_dict(r: Reading) -> dict[str, Any]:
    """A reading as a plain dict."""
    return {
        "id": r.id,
        "quantity": r.quantity,
        "value": _num(r.value),
        "bound": r.bound,
        "specimen": r.specimen,
        "conditions": dict(r.conditions or {}),
        "method": r.method,
        "instrument": r.instrument,
        "taken_at": _when(r.taken_at),
        "capture_id": r.capture_id,
        "note": r.note,
    }


def capture_dict(c: Capture) -> dict[str, Any]:
    """A capture without its content (which stays deferred in the database)."""
    return {
        "id": c.id,
        "kind": c.kind,
        "file_name": c.file_name,
        "sha256": c.sha256,
        "params": c.params,
        "results": c.results,
        "has_curve": c.curve is not None,
        "created_at": _when(c.created_at),
    }


def evidence_dict(ev: Any) -> dict[str, Any]:
    """A :class:`kitbin.match.evidence.Evidence` as a plain dict."""
    return {
        "quantity": ev.quantity,
        "grade": ev.grade,
        "low": _num(ev.low),
        "high": _num(ev.high),
        "mean": _num(ev.mean),
        "n": ev.n,
        "specimens": ev.specimens,
        "lower_bound_only": ev.lower_bound_only,
        "source": ev.source,
        "conservative": _num(ev.conservative()),
        "text": ev.describe(),
    }


# -- lookups -----------------------------------------------------------------------


def get_bin(session: Session, label: str) -> Bin:
    """The bin with this label.

    Raises
    ------
    NotFoundError
        With the nearest labels as a hint.
    """
    b = queries.bin_by_label(session, label)
    if b is None:
        raise NotFoundError(f"no bin labelled '{label}'", "see `kitbin bin list`")
    return b


def get_kit(session: Session, name: str) -> Kit:
    """The kit with this name.

    Raises
    ------
    NotFoundError
        When there is none.
    """
    kit = queries.kit_by_name(session, name)
    if kit is None:
        raise NotFoundError(f"no kit named '{name}'", "add it with `kitbin kit add NAME`")
    return kit


# -- kits --------------------------------------------------------------------------


def add_kit(
    store: Store,
    name: str,
    source: str | None = None,
    bought_on: str | dt.date | None = None,
    notes: str | None = None,
) -> dict[str, Any]:
    """Add a kit.

    Parameters
    ----------
    bought_on
        A date, or ISO text ``YYYY-MM-DD``.

    Raises
    ------
    QuantityError
        For an empty name or a bad date.
    KitbinError
        When a kit of that name exists.
    """
    name = name.strip()
    if not name:
        raise QuantityError("a kit needs a name")
    day = _date(bought_on)
    with store.transaction() as session:
        if queries.kit_by_name(session, name) is not None:
            raise KitbinError(f"a kit named '{name}' already exists")
        kit = Kit(name=name, source=_blank(source), bought_on=day, notes=_blank(notes))
        session.add(kit)
        session.flush()
        return kit_dict(kit, 0)


def list_kits(store: Store) -> list[dict[str, Any]]:
    """Every kit, by name, with its number of bins."""
    with store.transaction() as session:
        counts = queries.kit_bin_counts(session)
        return [kit_dict(k, counts.get(k.id, 0)) for k in queries.kits(session)]


def _date(value: str | dt.date | None) -> dt.date | None:
    if value is None or isinstance(value, dt.date):
        return value
    text = value.strip()
    if not text:
        return None
    try:
        return dt.date.fromisoformat(text)
    except ValueError:
        raise QuantityError(f"'{value}' is not a date", "write YYYY-MM-DD", text=value) from None


def _blank(text: str | None) -> str | None:
    if text is None:
        return None
    text = text.strip()
    return text or None


# -- bins --------------------------------------------------------------------------


def decode_marking(kind: str, marking: str) -> Any | None:
    """The decoded marking (:class:`kitbin.markings.Marking`), or None for kinds whose
    marking carries no value (diodes, ICs, other).

    ``brown black black silver`` on an inductor is 10 µH ±10 % (IEC 60062 colour
    code read in µH).

    Raises
    ------
    MarkingError
        When the marking cannot be decoded for this kind.
    """
    if kind not in NOMINAL_QUANTITY:
        return None
    from kitbin.markings import decode_marking as _decode

    return _decode(marking, kind)


def _nominal_and_tolerance(
    kind: str, nominal: str | None, tolerance: str | None, marking: str | None
) -> tuple[float | None, float | None, float | None, str | None]:
    """Nominal, tolerance and marking text from explicit options, else from the marking.

    An explicit ``nominal`` wins over the marking; the marked tolerance is used
    only when it belongs to the same value.
    """
    value = inputs.parse_nominal(kind, nominal) if nominal else None
    tol = inputs.parse_tolerance(tolerance) if tolerance else None
    text = _blank(marking)
    if text:
        decoded = decode_marking(kind, text)
        if decoded is not None:
            text = decoded.text
            same = value is None or math.isclose(value, decoded.value, rel_tol=1e-6)
            if value is None:
                value = float(decoded.value)
            if tol is None and same and decoded.tol_minus is not None:
                tol = (float(decoded.tol_minus), float(decoded.tol_plus))
    if tol is None:
        return value, None, None, text
    return value, tol[0], tol[1], text


def _set_properties(
    session: Session, b: Bin, props: Sequence[tuple[str, float]], source: str
) -> None:
    existing = {p.name: p for p in b.properties}
    for name, value in props:
        if name in existing:
            existing[name].value = value
            existing[name].source = source
        else:
            prop = BinProperty(name=name, value=value, source=source)
            b.properties.append(prop)
            existing[name] = prop
    session.flush()


def add_bin(
    store: Store,
    label: str,
    kind: str,
    *,
    kit: str | None = None,
    nominal: str | None = None,
    tolerance: str | None = None,
    marking: str | None = None,
    package: str | None = None,
    location: str | None = None,
    qty: int = 0,
    props: Iterable[str] = (),
    prop_source: str = "user",
    notes: str | None = None,
) -> dict[str, Any]:
    """Add a bin; its starting quantity is logged as the first stock move.

    Parameters
    ----------
    nominal, tolerance
        Text such as ``4.7uH`` and ``20%``; when absent they come from ``marking``
        (``"brown black black silver"`` on an inductor is 10 µH ±10 %).
    props
        ``NAME=VALUE`` items (``vrrm=40V``), stored with ``prop_source``.

    Raises
    ------
    QuantityError, MarkingError
        For a value, tolerance or marking that does not parse.
    KitbinError
        When the label is taken.
    NotFoundError
        When ``kit`` names no kit.
    """
    label = inputs.check_label(label)
    kind = inputs.parse_kind(kind)
    value, tol_minus, tol_plus, marking = _nominal_and_tolerance(kind, nominal, tolerance, marking)
    parsed_props = [inputs.parse_property(p) for p in props]
    if qty < 0:
        raise QuantityError(f"--qty {qty}: a starting quantity cannot be negative")
    with store.transaction() as session:
        if queries.label_taken(session, label):
            raise KitbinError(
                f"a bin labelled '{label}' already exists", "change it with `kitbin bin edit`"
            )
        b = Bin(
            label=label,
            kind=kind,
            kit=get_kit(session, kit) if kit else None,
            nominal=value,
            tol_minus=tol_minus,
            tol_plus=tol_plus,
            marking=_blank(marking),
            package=_blank(package),
            location=_blank(location),
            qty=0,
            qty_reserved=0,
            notes=_blank(notes),
        )
        session.add(b)
        session.flush()
        _set_properties(session, b, parsed_props, prop_source)
        if qty:
            move_stock(session, b.id, qty, "starting count")
            session.refresh(b)
        return bin_dict(b, 0)


def edit_bin(
    store: Store,
    label: str,
    *,
    new_label: str | None = None,
    kind: str | None = None,
    kit: str | None = None,
    nominal: str | None = None,
    tolerance: str | None = None,
    marking: str | None = None,
    package: str | None = None,
    location: str | None = None,
    props: Iterable[str] = (),
    prop_source: str = "user",
    drop_props: Iterable[str] = (),
    notes: str | None = None,
) -> dict[str, Any]:
    """Change a bin's description; quantities change only through stock moves.

    Options left as None are kept. ``kit=""`` makes the bin loose (no kit); a new
    ``marking`` without ``nominal`` re-derives nominal and tolerance from it.
    """
    parsed_props = [inputs.parse_property(p) for p in props]
    dropped = [inputs.quantity_name(p) for p in drop_props]
    with store.transaction() as session:
        b = get_bin(session, label)
        if new_label is not None and new_label.strip() != b.label:
            new = inputs.check_label(new_label)
            if queries.label_taken(session, new):
                raise KitbinError(f"a bin labelled '{new}' already exists")
            b.label = new
        if kind is not None:
            b.kind = inputs.parse_kind(kind)
            if b.kind not in NOMINAL_QUANTITY:
                b.nominal = b.tol_minus = b.tol_plus = None
        if kit is not None:
            b.kit = get_kit(session, kit) if kit.strip() else None
        if nominal is not None or tolerance is not None or marking is not None:
            value, tm, tp, text = _nominal_and_tolerance(b.kind, nominal, tolerance, marking)
            if marking is not None:
                b.marking = text
            if value is not None:
                b.nominal = value
            if tm is not None:
                b.tol_minus, b.tol_plus = tm, tp
        if package is not None:
            b.package = _blank(package)
        if location is not None:
            b.location = _blank(location)
        if notes is not None:
            b.notes = _blank(notes)
        for name in dropped:
            for prop in list(b.properties):
                if prop.name == name:
                    b.properties.remove(prop)
        _set_properties(session, b, parsed_props, prop_source)
        session.flush()
        return bin_dict(b, len(b.readings))


def list_bins(
    store: Store,
    *,
    kind: str | None = None,
    kit: str | None = None,
    search: str | None = None,
) -> list[dict[str, Any]]:
    """Bins by label, optionally of one kind, in one kit, or matching text.

    ``search`` is matched (case-insensitive) against label, marking, package,
    location and notes.
    """
    with store.transaction() as session:
        found = queries.bins(
            session,
            kind=inputs.parse_kind(kind) if kind else None,
            kit_id=get_kit(session, kit).id if kit else None,
            search=search,
        )
        counts = queries.reading_counts(session)
        return [bin_dict(b, counts.get(b.id, 0)) for b in found]


def bin_evidence(b: Bin, quantities: Iterable[str] | None = None) -> dict[str, Any]:
    """Evidence objects per quantity for a loaded bin (readings and properties loaded).

    Parameters
    ----------
    quantities
        Which to build; default: the kind's key quantities plus every quantity
        with a reading or a property.

    Returns
    -------
    dict
        Quantity name -> :class:`kitbin.match.evidence.Evidence`.
    """
    from kitbin.match.evidence import Nominal, PropertyValue, ReadingValue, build_evidence

    if quantities is None:
        wanted = list(KEY_QUANTITIES.get(b.kind, ()))
        nominal_q = NOMINAL_QUANTITY.get(b.kind)
        if nominal_q and nominal_q not in wanted:
            wanted.insert(0, nominal_q)
        for name in [r.quantity for r in b.readings] + [p.name for p in b.properties]:
            if name not in wanted and name in QUANTITIES:
                wanted.append(name)
    else:
        wanted = list(quantities)
    props = {p.name: p for p in b.properties}
    out: dict[str, Any] = {}
    for name in wanted:
        readings = [
            ReadingValue(
                value=r.value,
                bound=r.bound,
                specimen=r.specimen,
                conditions=dict(r.conditions or {}),
                method=r.method or "",
            )
            for r in b.readings
            if r.quantity == name
        ]
        nominal = None
        if name == NOMINAL_QUANTITY.get(b.kind) and b.nominal is not None:
            nominal = Nominal(
                value=b.nominal,
                tol_minus=b.tol_minus or 0.0,
                tol_plus=b.tol_plus,
                marking=b.marking or "",
            )
        stated = []
        if name in props:
            tol_prop = props.get(f"{name}_tol")
            stated.append(
                PropertyValue(
                    value=props[name].value,
                    source=props[name].source,
                    tol=tol_prop.value if tol_prop is not None else 0.0,
                )
            )
        out[name] = build_evidence(name, readings, nominal, stated)
    return out


def show_bin(store: Store, label: str) -> dict[str, Any]:
    """Everything about one bin: itself, its kit, readings, captures, moves, evidence.

    Returns
    -------
    dict
        ``bin_dict`` keys, plus ``kit_detail``, ``readings`` (list), ``captures``
        (list, without content), ``moves`` (list) and ``evidence`` (quantity ->
        grade, low, high, mean, n, specimens, lower_bound_only, source,
        conservative, text).
    """
    with store.transaction() as session:
        b = get_bin(session, label)
        data = bin_dict(b, len(b.readings))
        data["kit_detail"] = kit_dict(b.kit) if b.kit is not None else None
        data["readings"] = [reading_dict(r) for r in b.readings]
        data["captures"] = [capture_dict(c) for c in b.captures]
        data["moves"] = [
            {
                "delta": m.delta,
                "reason": m.reason,
                "pick_list_id": m.pick_list_id,
                "qty_after": m.qty_after,
                "at": _when(m.at),
            }
            for m in b.moves
        ]
        data["evidence"] = {name: evidence_dict(ev) for name, ev in bin_evidence(b).items()}
        data["created_at"] = _when(b.created_at)
        data["updated_at"] = _when(b.updated_at)
        return data


# -- readings and stock ------------------------------------------------------------


def record_readings(
    store: Store,
    label: str,
    items: Sequence[str],
    *,
    specimen: int | None = None,
    at: Sequence[str] = (),
    method: str | None = None,
    instrument: str | None = None,
    note: str | None = None,
    taken_at: dt.datetime | None = None,
) -> list[dict[str, Any]]:
    """Record several readings on one bin at once (all or none).

    Parameters
    ----------
    items
        ``QUANTITY=VALUE`` or ``QUANTITY>=VALUE`` texts (``inductance=9.6uH``,
        ``isat_20>=3A``).
    specimen
        Number of the specimen measured (1 or more), or None.
    at
        Test conditions ``freq=100kHz``, ``temp=25degC``, ``bias=0.5A`` (SI in JSON).
    """
    if not items:
        raise QuantityError("nothing to record", "give QUANTITY=VALUE, e.g. inductance=4.7uH")
    parsed = [inputs.parse_assignment(item) for item in items]
    for a in parsed:
        if not math.isfinite(a.value):
            raise QuantityError(f"{a.quantity}: value must be finite")
    conditions = inputs.parse_conditions(list(at))
    if specimen is not None and specimen < 1:
        raise QuantityError(f"--specimen {specimen}: specimens are numbered from 1")
    with store.transaction() as session:
        b = get_bin(session, label)
        rows = []
        for a in parsed:
            reading = Reading(
                bin_id=b.id,
                specimen=specimen,
                quantity=a.quantity,
                value=a.value,
                bound=a.bound,
                conditions=dict(conditions),
                method=_blank(method),
                instrument=_blank(instrument),
                note=_blank(note),
                **({"taken_at": taken_at} if taken_at is not None else {}),
            )
            session.add(reading)
            rows.append(reading)
        session.flush()
        return [{"label": b.label, **reading_dict(r)} for r in rows]


def adjust_stock(store: Store, label: str, delta: int, why: str) -> dict[str, Any]:
    """Add (positive) or take (negative) parts, with the reason logged.

    Raises
    ------
    StockError
        When more would be taken than is free; nothing changes.
    """
    with store.transaction() as session:
        b = get_bin(session, label)
        result = move_stock(session, b.id, delta, why)
        return {
            "label": result.label,
            "delta": result.delta,
            "qty": result.qty,
            "qty_reserved": result.qty_reserved,
            "qty_free": result.qty - result.qty_reserved,
            "reason": why.strip(),
        }


__all__ = [
    "KEY_QUANTITIES",
    "add_bin",
    "add_kit",
    "adjust_stock",
    "bin_dict",
    "bin_evidence",
    "decode_marking",
    "edit_bin",
    "get_bin",
    "get_kit",
    "list_bins",
    "list_kits",
    "record_readings",
    "show_bin",
]
