"""What the plan view shows, as text: corners, demands, verdict reasons (pure)."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from kitbin.quantities import QUANTITIES
from kitbin.tui.widgets.bin.text import _si
from kitbin.units import format_quantity

_OPS = {">=": "≥", "<=": "≤", "==": "=", ">": ">", "<": "<"}

#: Corner columns shown: (record key, header).
CORNER_COLUMNS = (
    ("name", "corner"),
    ("vin_V", "Vin"),
    ("iout_A", "Iout"),
    ("mode", "mode"),
    ("duty", "duty"),
    ("ripple_App", "ΔI p-p"),
    ("i_peak_A", "Ipeak"),
    ("i_rms_A", "IL rms"),
)


def corner_cells(corner: Mapping[str, Any]) -> tuple[str, ...]:
    """One corner's cells (see :data:`CORNER_COLUMNS`)."""
    out = []
    for key, _ in CORNER_COLUMNS:
        value = corner.get(key)
        if key == "duty":
            out.append("—" if value is None else f"{100 * value:.1f} %")
        elif key in ("name", "mode"):
            out.append(str(value or ""))
        else:
            out.append(_si(key, value))
    return tuple(out)


def limit_text(quantity: str, limit: float | None) -> str:
    """A constraint's limit in the quantity's unit (plain number when unknown)."""
    if limit is None:
        return "—"
    kind = QUANTITIES.get(quantity)
    return format_quantity(limit, kind.dimension) if kind else f"{limit:g}"


def demand_lines(demands: Mapping[str, Mapping[str, Any]]) -> list[str]:
    """Per role: each constraint as ``quantity ≥ limit — reason``, then notes."""
    lines: list[str] = []
    for role, d in demands.items():
        lines.append(f"{role}:")
        for c in d.get("constraints", ()):
            op = _OPS.get(c["op"], c["op"])
            lines.append(
                f"  {c['quantity']} {op} {limit_text(c['quantity'], c['limit'])} — {c['reason']}"
            )
        for note in d.get("notes", ()):
            lines.append(f"  note: {note}")
    return lines


def plan_summary(plan: Mapping[str, Any]) -> str:
    """One line: topology, inductance used for the corners and its source."""
    text = f"{plan.get('name')} · {plan.get('topology')}"
    if plan.get("l_min_H") is not None:
        text += f" · L min {format_quantity(plan['l_min_H'], 'inductance')}"
    if plan.get("notes"):
        text += f" · {plan['notes']}"
    return text


def check_lines(checks: Sequence[Any]) -> list[str]:
    """Each check of a verdict: its sentence (needed, has, margin, status) and reason."""
    lines = []
    for c in checks:
        mark = {"pass": "✓", "fail": "✗", "unverified": "?"}.get(c.status, " ")
        lines.append(f"{mark} {c.sentence()}")
        if c.reason:
            lines.append(f"    because {c.reason}")
    return lines


def ranked_cells(row: Any) -> tuple[str, ...]:
    """rank, bin, verdict, score, summary of one ranked row."""
    return (str(row.rank), row.label, row.verdict, f"{row.score:.1f}", row.summary)


def divider_lines(d: Mapping[str, Any] | None) -> list[str]:
    """The feedback divider chosen from stock (:func:`kitbin.services.matching.divider_dict`)."""
    if d is None:
        return []
    if d.get("rtop") is None:
        return [f"feedback divider: {d.get('verdict')} — {d.get('note')}"]
    band = d.get("vout_band_V") or [None, None]
    lines = [
        f"feedback divider: top {d['rtop']}, bottom {d['rbottom']} → "
        f"{_si('_V', d.get('vout_V'))} ({d.get('error_pct', 0):+.2f} %), worst case "
        f"{_si('_V', band[0])} … {_si('_V', band[1])} · {d.get('verdict')}",
    ]
    if d.get("note"):
        lines.append(f"  {d['note']}")
    for c in d.get("checks", ()):
        lines.append(f"  {c['status']}: {c['name']} — {c['reason']}")
    return lines


def pick_cells(p: Mapping[str, Any]) -> tuple[str, ...]:
    """id, plan, boards, state, created, lines of a stored pick list."""
    lines = ", ".join(f"{ln['role']} {ln['bin'] or '—'}×{ln['total']}" for ln in p.get("lines", ()))
    return (
        str(p["id"]),
        p["plan"],
        str(p["boards"]),
        p["state"],
        (p.get("created_at") or "").replace("T", " ")[:16],
        lines,
    )
