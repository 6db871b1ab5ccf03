"""What the bin view shows, as text: one function per panel (pure, tested directly)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from kitbin.quantities import CONDITIONS, QUANTITIES
from kitbin.units import DIMENSIONS, format_quantity


def value_text(quantity: str, value: float | None, bound: str = "=") -> str:
    """``9.60 µH`` or ``≥ 2.10 A`` (a lower bound: "not reached up to")."""
    kind = QUANTITIES.get(quantity)
    shown = format_quantity(value, kind.dimension) if kind else f"{value:g}"
    return f"≥ {shown}" if bound == ">=" else shown


def conditions_text(conditions: Mapping[str, Any] | None) -> str:
    """``freq 100 kHz, temp 25.0 °C`` (unknown names shown as they are)."""
    if not conditions:
        return ""
    parts = []
    for name, value in conditions.items():
        dim = CONDITIONS.get(name)
        if isinstance(value, int | float) and dim in DIMENSIONS:
            parts.append(f"{name} {format_quantity(float(value), dim)}")
        else:
            parts.append(f"{name} {value}")
    return ", ".join(parts)


def when_text(iso: str | None) -> str:
    """``2026-12-01 14:05`` from ISO text (UTC as stored)."""
    if not iso:
        return ""
    return iso.replace("T", " ")[:16]


def reading_cells(r: Mapping[str, Any]) -> tuple[str, ...]:
    """quantity, value, specimen, conditions, method, taken, capture."""
    return (
        r["quantity"],
        value_text(r["quantity"], r.get("value"), r.get("bound", "=")),
        str(r["specimen"]) if r.get("specimen") else "",
        conditions_text(r.get("conditions")),
        r.get("method") or "",
        when_text(r.get("taken_at")),
        f"#{r['capture_id']}" if r.get("capture_id") else "",
    )


def move_cells(m: Mapping[str, Any]) -> tuple[str, ...]:
    """when, change, after, reason, pick list."""
    delta = int(m["delta"])
    return (
        when_text(m.get("at")),
        f"{delta:+d}",
        str(m.get("qty_after", "")),
        m.get("reason") or "",
        f"#{m['pick_list_id']}" if m.get("pick_list_id") else "",
    )


def _si(key: str, value: Any) -> str:
    """A result value by its key's unit suffix (``l0_H``, ``tau_s``, ``r_th_K_per_W``)."""
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if not isinstance(value, int | float):
        return str(value)
    units = (
        ("_K_per_W", "thermal_resistance"),
        ("_App", "current"),
        ("_Vpp", "voltage"),
        ("_ohm", "resistance"),
        ("_H", "inductance"),
        ("_A", "current"),
        ("_V", "voltage"),
        ("_W", "power"),
        ("_s", "time"),
        ("_C", "temperature"),
        ("_K", "temperature_rise"),
    )
    for suffix, dim in units:
        if key.endswith(suffix):
            return format_quantity(float(value), dim)
    if isinstance(value, float) and not math.isfinite(value):
        return "—"
    return f"{value:.4g}" if isinstance(value, float) else str(value)


#: Results shown first for each kind of capture.
_KEY_RESULTS = {
    "ramp": ("l0_H", "i_max_A", "saturated", "ramps", "l0_spread", "noise_A"),
    "heat": (
        "t_amb_C",
        "rise_ss_K",
        "tau_s",
        "current_A",
        "r_th_K_per_W",
        "i_for_rise_A",
        "t_hot_C",
        "reached_fraction",
    ),
}


#: How each result is named on screen.
RESULT_NAMES = {
    "l0_H": "L0 (low bias)",
    "i_max_A": "highest current",
    "saturated": "saturated",
    "ramps": "ramps used",
    "l0_spread": "L0 spread (fraction)",
    "noise_A": "current noise",
    "t_amb_C": "ambient",
    "rise_ss_K": "steady rise",
    "tau_s": "time constant",
    "current_A": "test current",
    "r_th_K_per_W": "R_th",
    "i_for_rise_A": "current for the allowed rise",
    "t_hot_C": "hot temperature",
    "reached_fraction": "share of the rise reached",
}


def results_lines(kind: str, results: Mapping[str, Any]) -> list[str]:
    """The analysis results of a capture, key ones first, one per line."""
    lines = []
    if kind == "ramp" and isinstance(results.get("isat_A"), Mapping):
        isat = results["isat_A"]
        i_max = results.get("i_max_A")
        parts = []
        for pct in sorted(isat, key=lambda k: int(k)):
            v = isat[pct]
            parts.append(
                f"Isat{pct}% "
                + (_si("_A", v) if v is not None else f"not reached (≥ {_si('_A', i_max)})")
            )
        lines.append(", ".join(parts))
    for key in _KEY_RESULTS.get(kind, ()):
        if key in results:
            lines.append(f"{RESULT_NAMES.get(key, key)}: {_si(key, results[key])}")
    for key in ("warnings", "flags"):
        if results.get(key):
            lines.append(f"{key}: " + "; ".join(str(w) for w in results[key]))
    return lines


def capture_cells(c: Mapping[str, Any]) -> tuple[str, ...]:
    """id, kind, file, key result, when."""
    res = c.get("results") or {}
    if c["kind"] == "ramp":
        key = f"L0 {_si('l0_H', res.get('l0_H'))}"
    elif c["kind"] == "heat":
        rise = _si("rise_ss_K", res.get("rise_ss_K"))
        key = f"rise {rise} at {_si('current_A', res.get('current_A'))}"
    else:
        key = ""
    return (f"#{c['id']}", c["kind"], c.get("file_name") or "", key, when_text(c.get("created_at")))


def tolerance_text(minus: float, plus: float) -> str:
    """A tolerance from its (minus, plus) fractions: ``±20 %`` or ``-20/+80 %``."""
    if minus == plus:
        return f"±{minus * 100:g} %"
    return f"-{minus * 100:g}/+{plus * 100:g} %"


def head_lines(page: Mapping[str, Any]) -> list[str]:
    """The bin's description: value, marking and what it decodes to, stock, place."""
    kind = page["kind"]
    first = f"{page['label']} · {kind}"
    nq = page.get("nominal_quantity")
    if page.get("nominal") is not None and nq:
        first += f" · nominal {format_quantity(page['nominal'], QUANTITIES[nq].dimension)}"
        if page.get("tol_minus") is not None:
            tm, tp = page["tol_minus"], page.get("tol_plus", page["tol_minus"])
            first += f" {tolerance_text(tm, tp)}"
    if page.get("package"):
        first += f" · {page['package']}"
    lines = [first]
    if page.get("marking"):
        decoded = page.get("marking_decoded") or page.get("marking_problem") or "no value"
        lines.append(f"marking '{page['marking']}' → {decoded}")
    stock = f"{page['qty']} on hand, {page['qty_reserved']} reserved, {page['qty_free']} free"
    where = " · ".join(x for x in (page.get("location"), page.get("kit")) if x)
    lines.append(stock + (f" · {where}" if where else ""))
    if page.get("notes"):
        lines.append(page["notes"])
    return lines


def evidence_lines(page: Mapping[str, Any]) -> list[str]:
    """One line per quantity with its grade and interval, then stated properties."""
    lines = [e["text"] for e in page.get("evidence", {}).values()]
    props = page.get("properties") or []
    if props:
        lines.append("")
        lines.append("stated properties:")
        for p in props:
            lines.append(f"  {p['name']} = {value_text(p['name'], p['value'])} ({p['source']})")
    return lines


def l_curve(curve: Mapping[str, Any]) -> tuple[list[float], list[float]] | None:
    """(current in A, inductance in µH) of a stored L(i) curve, or None."""
    i = curve.get("i_A", curve.get("i"))
    lh = curve.get("L_H", curve.get("l"))
    if not i or not lh or len(i) != len(lh):
        return None
    pts = [(float(a), float(b) * 1e6) for a, b in zip(i, lh, strict=True) if b is not None]
    pts = [(a, b) for a, b in pts if math.isfinite(a) and math.isfinite(b)]
    if not pts:
        return None
    return [p[0] for p in pts], [p[1] for p in pts]


__all__ = [
    "capture_cells",
    "conditions_text",
    "evidence_lines",
    "head_lines",
    "l_curve",
    "move_cells",
    "reading_cells",
    "results_lines",
    "value_text",
]
