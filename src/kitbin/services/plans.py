"""Saved plans: a converter spec stored in the ``plan`` table, and its TOML file.

The ``plan.spec`` JSON column holds exactly :meth:`kitbin.stage.Spec.to_dict` (SI
floats); :func:`spec_of` turns a row's JSON back into a :class:`~kitbin.stage.Spec`.
A controller bin's properties (vref, vref_tol, ifb, fsw, ilim, ilim_gain, ton_min,
d_max, vin_min, vin_max, rds_on) fill the matching spec fields; options given
explicitly win over them. Everything is checked before the transaction writes, so
a bad option or file leaves the database as it was.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path
from typing import TYPE_CHECKING, Any

from kitbin.errors import KitbinError, NotFoundError, QuantityError, SpecError
from kitbin.stage.spec import (
    CONTROLLER_FIELDS,
    FIELD_DIMENSIONS,
    SPEC_FIELDS,
    Spec,
    spec_from_dict,
)

if TYPE_CHECKING:
    from kitbin.store import Store

#: Spec options of the command line: option name -> spec field (``vin`` and ``sync`` special).
OPTION_FIELDS: dict[str, str] = {
    "--topology": "topology",
    "--vin": "vin",
    "--vout": "vout",
    "--iout": "iout_max",
    "--iout-min": "iout_min",
    "--fsw": "fsw",
    "--vf": "vf",
    "--rsw": "rsw",
    "--sync": "sync",
    "--rectifier": "rectifier",
    "--ripple": "ripple_ratio",
    "--vout-ripple": "vout_ripple_max",
    "--vin-ripple": "vin_ripple_max",
    "--ambient": "t_ambient",
    "--rise-max": "rise_max",
    "--isat-drop": "isat_drop",
    "--isat-margin": "isat_margin",
    "--vout-tol": "vout_tol",
    "--ilim": "ilim",
    "--ton-min": "ton_min",
    "--d-max": "d_max",
    "--vref": "vref",
    "--vref-tol": "vref_tol",
    "--ifb": "ifb",
    "--ilim-gain": "ilim_gain",
    "--ilim-target": "ilim_target",
    "--rbottom": "rbottom",
}

#: Options and TOML keys that give two spec fields as one range ("11..15V").
RANGE_FIELDS: dict[str, tuple[str, str, str]] = {
    "vin": ("vin_min", "vin_max", "voltage"),
    "rbottom": ("rbottom_min", "rbottom_max", "resistance"),
}

_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9 ._\-+/#]{0,199}$")


class PlanExistsError(KitbinError, ValueError):
    """A plan name that is already taken."""

    exit_code = SpecError.exit_code


def _parse_field(field: str, value: Any, where: str) -> Any:
    """One spec field from text or a number (SI), naming ``where`` in errors."""
    from kitbin.units import parse_quantity

    if field == "isat_drop":
        number = value
        if isinstance(value, str):
            text = value.strip()
            try:
                number = parse_quantity(text, "ratio") * (100 if text.endswith("%") else 1)
            except QuantityError as e:
                raise QuantityError(f"{where}: {e.msg}") from None
        if isinstance(number, bool) or not isinstance(number, int | float):
            raise SpecError(f"{where}: expected 10, 20 or 30 (% inductance drop)")
        if 0 < number < 1:
            number *= 100
        return round(number)
    dim = FIELD_DIMENSIONS.get(field)
    if dim is None or not isinstance(value, str):
        return value
    try:
        return parse_quantity(value, dim)
    except QuantityError as e:
        raise QuantityError(f"{where}: {e.msg}", e.hint) from None


def parse_spec_texts(texts: dict[str, str | None]) -> dict[str, Any]:
    """Spec field values from command-line option texts.

    Parameters
    ----------
    texts
        Option name (``"--vin"``) -> the text typed, or None when not given.

    Returns
    -------
    dict
        Spec fields (SI floats) for the options given.

    Raises
    ------
    QuantityError, SpecError
        On text that does not parse, naming the option.
    """
    from kitbin.units import parse_quantity, parse_range

    out: dict[str, Any] = {}
    for option, text in texts.items():
        if text is None:
            continue
        field = OPTION_FIELDS[option]
        if field in RANGE_FIELDS:
            low, high, dim = RANGE_FIELDS[field]
            try:
                out[low], out[high] = parse_range(text, dim)
            except QuantityError as e:
                raise QuantityError(f"{option}: {e.msg}", e.hint) from None
        elif field == "sync":
            out["rectifier"] = "sync"
            try:
                out["r_rect"] = parse_quantity(text, "resistance")
            except QuantityError as e:
                raise QuantityError(f"{option}: {e.msg}", e.hint) from None
        elif field in ("topology", "rectifier"):
            out[field] = text.strip().lower()
        else:
            out[field] = _parse_field(field, text, option)
    return out


def build_spec(base: dict[str, Any], updates: dict[str, Any]) -> Spec:
    """A validated spec from a base dict and updates (updates win)."""
    data = {**base, **{k: v for k, v in updates.items()}}
    return spec_from_dict(data)


# -- TOML -------------------------------------------------------------------------------


def read_toml(path: str | Path) -> tuple[dict[str, Any], str | None]:
    """Spec fields and notes from a plan TOML file.

    Numbers are SI; a string is parsed with its field's unit (``vout = "5.1V"``);
    ``vin = "11..15V"`` gives both ends. Extra parts are ``[[extras]]`` tables with
    ``name``, ``quantity``, ``op``, ``limit``, ``reason``.

    Raises
    ------
    SpecError
        When the file is missing, is not TOML, or holds an unknown key.
    """
    import tomllib

    p = Path(path)
    try:
        raw = tomllib.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise SpecError(f"plan file {str(p)!r} not found") from None
    except (OSError, UnicodeDecodeError) as e:
        raise SpecError(f"plan file {str(p)!r} cannot be read: {e}") from None
    except tomllib.TOMLDecodeError as e:
        raise SpecError(f"plan file {str(p)!r} is not valid TOML: {e}") from None
    notes = raw.pop("notes", None)
    raw.pop("name", None)
    out: dict[str, Any] = {}
    for key, value in raw.items():
        where = f"{p.name}: {key}"
        if key in RANGE_FIELDS:
            from kitbin.units import parse_range

            low, high, dim = RANGE_FIELDS[key]
            if isinstance(value, str):
                try:
                    out[low], out[high] = parse_range(value, dim)
                except QuantityError as e:
                    raise QuantityError(f"{where}: {e.msg}") from None
            else:
                example = "11..15V" if key == "vin" else "1k..100k"
                raise SpecError(f'{where}: expected text such as "{example}"')
        elif key == "extras":
            if not isinstance(value, list):
                raise SpecError(f"{where}: expected [[extras]] tables")
            extras = []
            for item in value:
                if not isinstance(item, dict):
                    raise SpecError(f"{where}: expected [[extras]] tables")
                item = dict(item)
                if isinstance(item.get("limit"), str):
                    from kitbin.quantities import QUANTITIES
                    from kitbin.units import parse_quantity

                    q = QUANTITIES.get(str(item.get("quantity")))
                    if q is None:
                        raise SpecError(f"{where}: unknown quantity {item.get('quantity')!r}")
                    item["limit"] = parse_quantity(item["limit"], q.dimension)
                extras.append(item)
            out["extras"] = extras
        elif key not in SPEC_FIELDS:
            raise SpecError(
                f"{where}: unknown key (expected one of vin, rbottom, {', '.join(SPEC_FIELDS)})"
            )
        else:
            out[key] = _parse_field(key, value, where)
    if notes is not None and not isinstance(notes, str):
        raise SpecError(f"{p.name}: notes: expected text")
    return out, notes


def _toml_value(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    return json.dumps(str(value), ensure_ascii=False)


def spec_toml(spec: Spec, name: str | None = None, notes: str | None = None) -> str:
    """A plan as TOML text (SI units), readable back by :func:`read_toml`."""
    lines = [
        "# kitbin plan: SI units (V, A, Hz, ohm, s, °C for temperatures, K for rises)",
    ]
    if name:
        lines.append(f"name = {_toml_value(name)}")
    if notes:
        lines.append(f"notes = {_toml_value(notes)}")
    data = spec.to_dict()
    extras = data.pop("extras")
    for key in SPEC_FIELDS:
        if key == "extras":
            continue
        value = data.get(key)
        if value is None:
            continue
        lines.append(f"{key} = {_toml_value(value)}")
    for extra in extras:
        lines.append("")
        lines.append("[[extras]]")
        for key, value in extra.items():
            lines.append(f"{key} = {_toml_value(value)}")
    return "\n".join(lines) + "\n"


# -- database ---------------------------------------------------------------------------


def _check_name(name: str) -> str:
    name = name.strip()
    if not _NAME.match(name):
        raise SpecError(
            f"plan name {name!r}: expected 1–200 letters, digits, spaces or ._-+/# "
            "starting with a letter or digit"
        )
    return name


def controller_fields(session: Any, label: str) -> dict[str, float]:
    """Spec fields filled from a controller bin's properties.

    Raises
    ------
    NotFoundError
        When no bin has that label.
    SpecError
        When the bin is not a controller.
    """
    from kitbin.store import queries

    b = queries.bin_by_label(session, label)
    if b is None:
        raise NotFoundError(f"controller bin {label!r} not found", "see `kitbin bin list`")
    if b.kind != "controller":
        raise SpecError(f"bin {label!r} is a {b.kind}, not a controller")
    out: dict[str, float] = {}
    for prop in b.properties:
        field = CONTROLLER_FIELDS.get(prop.name)
        if field is not None:
            out[field] = float(prop.value)
    return out


def _plan_row(session: Any, name: str) -> Any:
    from sqlalchemy import select

    from kitbin.store.models import Plan

    row = session.scalars(select(Plan).where(Plan.name == name)).first()
    if row is None:
        raise NotFoundError(f"plan {name!r} not found", "see `kitbin plan list`")
    return row


def spec_of(row_spec: dict[str, Any]) -> Spec:
    """The :class:`Spec` stored in a plan row's ``spec`` JSON."""
    return spec_from_dict(dict(row_spec))


def _plan_dict(row: Any) -> dict[str, Any]:
    return {
        "name": row.name,
        "topology": row.topology,
        "spec": dict(row.spec),
        "notes": row.notes,
        "created_at": row.created_at.isoformat() if row.created_at else None,
        "updated_at": row.updated_at.isoformat() if row.updated_at else None,
    }


def new_plan(
    store: Store,
    name: str,
    updates: dict[str, Any],
    *,
    from_file: str | None = None,
    controller: str | None = None,
    notes: str | None = None,
) -> dict[str, Any]:
    """Store a new plan: TOML file (if any), then the controller's properties, then options.

    Returns
    -------
    dict
        The stored plan (name, topology, spec, notes, times).
    """
    from kitbin.store.models import Plan

    name = _check_name(name)
    base: dict[str, Any] = {}
    if from_file is not None:
        base, file_notes = read_toml(from_file)
        notes = notes if notes is not None else file_notes
    with store.transaction() as session:
        from sqlalchemy import select

        if session.scalars(select(Plan).where(Plan.name == name)).first() is not None:
            raise PlanExistsError(f"plan {name!r} already exists", "use `kitbin plan edit`")
        label = controller or base.get("controller")
        filled = controller_fields(session, label) if label else {}
        spec = build_spec(
            {**base, **filled}, {**updates, **({"controller": label} if label else {})}
        )
        row = Plan(name=name, topology=spec.topology, spec=spec.to_dict(), notes=notes)
        session.add(row)
        session.flush()
        return _plan_dict(row)


def edit_plan(
    store: Store,
    name: str,
    updates: dict[str, Any],
    *,
    controller: str | None = None,
    notes: str | None = None,
) -> dict[str, Any]:
    """Change a plan's spec: a new controller's properties fill in, then the options win."""
    with store.transaction() as session:
        row = _plan_row(session, name)
        base = dict(row.spec)
        filled = controller_fields(session, controller) if controller else {}
        extra = {"controller": controller} if controller else {}
        spec = build_spec({**base, **filled}, {**updates, **extra})
        row.spec = spec.to_dict()
        row.topology = spec.topology
        if notes is not None:
            row.notes = notes
        session.flush()
        return _plan_dict(row)


def list_plans(store: Store) -> list[dict[str, Any]]:
    """Every plan, by name."""
    from sqlalchemy import select

    from kitbin.store.models import Plan

    with store.transaction() as session:
        rows = session.scalars(select(Plan).order_by(Plan.name)).all()
        out = []
        for row in rows:
            d = _plan_dict(row)
            s = d["spec"]
            d["summary"] = (
                f"{s.get('topology')} {s.get('vin_min'):g}..{s.get('vin_max'):g} V -> "
                f"{s.get('vout'):g} V, {s.get('iout_max'):g} A, {s.get('fsw', 0) / 1e3:g} kHz"
            )
            out.append(d)
        return out


def get_plan(store: Store, name: str) -> tuple[dict[str, Any], Spec]:
    """A stored plan and its spec."""
    with store.transaction() as session:
        row = _plan_row(session, name)
        d = _plan_dict(row)
    return d, spec_of(d["spec"])


def show_plan(store: Store, name: str) -> dict[str, Any]:
    """A plan with its corners (at the smallest allowed inductance) and demands."""
    from kitbin.stage.report import stage_report

    d, spec = get_plan(store, name)
    return {**d, **stage_report(spec)}


def plan_toml(store: Store, name: str) -> str:
    """A stored plan as TOML text."""
    d, spec = get_plan(store, name)
    return spec_toml(spec, d["name"], d["notes"])
