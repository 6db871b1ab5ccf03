"""Pick lists and bring-up sheets, and their renderers (text, CSV, Markdown, HTML).

A pick list is a plan times a number of boards: per role the chosen bin, how many
parts per board and in total, what is free in the bin (on hand minus reserved), the
shortfall, where the bin is and how to recognise its parts. The bring-up sheet
says what to expect at first power-up. Both are plain frozen dataclasses; the
renderers take them and return strings (no I/O here).

CSV cells that a spreadsheet would run as a formula (starting with ``=``, ``+``,
``-``, ``@``, a tab or a carriage return) are neutralised with a leading
apostrophe; HTML is escaped and self-contained (inline style, no scripts, no links).
"""

from __future__ import annotations

import csv
import html
import io
import math
from collections.abc import Sequence
from dataclasses import dataclass, field

from kitbin.units import format_quantity

#: The cautions every bring-up sheet carries (common practice, no source).
SAFETY_CAUTIONS: tuple[str, ...] = (
    "Inductors, diodes and switches run hot: let them cool before touching, and keep "
    "the board off flammable surfaces during first power-up.",
    "Capacitors store energy (E = ½·C·V²): discharge them through a resistor before "
    "handling, and mind polarity and rated voltage of electrolytics.",
    "A mains-powered oscilloscope's ground clip is bonded to protective earth: on a "
    "non-isolated circuit clip it to the circuit's 0 V only, use a differential probe "
    "or an isolated supply, and never defeat the scope's protective earth.",
    "Mains-powered supplies: work only on the low-voltage side from an isolated bench "
    "supply; mains wiring is for people qualified to do it.",
    "Lithium batteries deliver large fault currents and can burn: fuse the input, use "
    "a current-limited supply for first power-up, never short or puncture a cell.",
    "Bring the input up slowly with a current limit set just above the expected input "
    "current, and check for smoke, heat and the expected output before full load.",
    "These notes are no substitute for local electrical codes and licensed practice; "
    "follow them where they apply.",
)


@dataclass(frozen=True)
class PickLine:
    """One role of a pick list.

    Parameters
    ----------
    role
        The plan's role (``inductor``, ``output_capacitor``, ``divider_top`` ...).
    label
        Chosen bin label, or None when nothing in stock fits.
    description
        What the part is, e.g. "10.0 µH inductor".
    qty_per_board, boards
        Parts per board and number of boards.
    on_hand, reserved
        The bin's quantity and what other pick lists hold.
    kit, location
        Where to find the bin.
    recognise
        How to recognise the part (marking, colour bands, body size).
    verdict
        ``verified``, ``unverified`` (feasible with unverified checks), ``fails``
        (chosen though a check fails, by override) or ``none``.
    note
        One line of why (e.g. "overridden with --use", "best verified of 12").
    held_by_this
        Parts this pick list itself already holds (when it is ``reserved``).
    """

    role: str
    label: str | None
    description: str
    qty_per_board: int
    boards: int
    on_hand: int = 0
    reserved: int = 0
    kit: str = ""
    location: str = ""
    recognise: str = ""
    verdict: str = "verified"
    note: str = ""
    held_by_this: int = 0

    @property
    def qty_total(self) -> int:
        """Parts to pick for all boards."""
        return self.qty_per_board * self.boards

    @property
    def available(self) -> int:
        """Free parts: on hand minus reserved by others (this list's own hold counts as free)."""
        return max(0, self.on_hand - self.reserved + self.held_by_this) if self.label else 0

    @property
    def shortfall(self) -> int:
        """Parts missing for all boards (0 when enough are free)."""
        return max(0, self.qty_total - self.available)


@dataclass(frozen=True)
class CornerExpectation:
    """What to expect at one input corner of a plan (full load).

    Parameters
    ----------
    vin
        Input voltage, V.
    duty
        Expected duty cycle (fraction).
    ripple_pp
        Inductor ripple current peak-to-peak, A.
    i_peak
        Peak inductor current, A.
    ccm_min_load
        Lowest load current that keeps continuous conduction, A.
    """

    vin: float
    duty: float
    ripple_pp: float
    i_peak: float
    ccm_min_load: float


@dataclass(frozen=True)
class BringUpSheet:
    """The values to expect at first power-up.

    Voltages V, currents A, resistances Ω, temperatures K (rises).

    Parameters
    ----------
    vout_nominal, vout_low, vout_high
        Output voltage from the chosen divider and its worst-case band.
    corners
        Expectations at each input corner.
    sense_resistance
        Value of the current-sense resistor the ripple is shown across.
    temp_rise
        Expected inductor temperature rise at full load (None when unknown).
    sat_margin
        Inductor saturation current over the worst peak (None when unknown).
    notes
        Extra lines (e.g. which evidence was assumed).
    """

    vout_nominal: float | None
    vout_low: float | None
    vout_high: float | None
    corners: tuple[CornerExpectation, ...] = ()
    sense_resistance: float = 0.1
    temp_rise: float | None = None
    sat_margin: float | None = None
    notes: tuple[str, ...] = ()
    cautions: tuple[str, ...] = SAFETY_CAUTIONS

    @property
    def ccm_min_load(self) -> float | None:
        """Lowest load giving CCM at every input corner, A (the largest boundary)."""
        return max((c.ccm_min_load for c in self.corners), default=None)

    def ripple_mv(self, corner: CornerExpectation) -> float:
        """Ripple seen across the sense resistor at a corner, mV peak-to-peak."""
        return 1e3 * corner.ripple_pp * self.sense_resistance


@dataclass(frozen=True)
class PickSheet:
    """A pick list with its bring-up sheet.

    Parameters
    ----------
    plan
        Plan name.
    topology
        ``buck``, ``boost`` or ``invert``.
    boards
        Number of boards.
    lines
        One line per role.
    bring_up
        The bring-up sheet, or None.
    pick_id
        Pick list id once saved (reserved), else None.
    state
        ``draft``, ``reserved``, ``picked`` or ``cancelled``.
    summary
        One line describing the plan (e.g. "12 V → 5 V, 2 A, 500 kHz").
    """

    plan: str
    topology: str
    boards: int
    lines: tuple[PickLine, ...]
    bring_up: BringUpSheet | None = None
    pick_id: int | None = None
    state: str = "draft"
    summary: str = ""
    extra_notes: tuple[str, ...] = field(default=())

    @property
    def shortfalls(self) -> tuple[PickLine, ...]:
        """Lines that cannot be filled for every board."""
        return tuple(ln for ln in self.lines if ln.shortfall > 0)

    @property
    def complete(self) -> bool:
        """True when every role has a bin and enough free parts."""
        return all(ln.label and ln.shortfall == 0 for ln in self.lines)


# -- rows shared by every renderer ---------------------------------------------------

COLUMNS = (
    "role",
    "bin",
    "part",
    "per board",
    "total",
    "free",
    "short",
    "kit",
    "location",
    "recognise",
    "verdict",
    "note",
)


def line_cells(line: PickLine) -> list[str]:
    """The cells of one pick line, in :data:`COLUMNS` order, as text."""
    return [
        line.role,
        line.label or "—",
        line.description,
        str(line.qty_per_board),
        str(line.qty_total),
        str(line.available) if line.label else "—",
        str(line.shortfall) if line.shortfall else "",
        line.kit,
        line.location,
        line.recognise,
        line.verdict,
        line.note,
    ]


def _fmt(value: float | None, dim: str, digits: int = 3) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "unknown"
    return format_quantity(value, dim, digits)


def bring_up_rows(sheet: BringUpSheet) -> list[tuple[str, str]]:
    """(item, value) pairs of a bring-up sheet, in reading order."""
    rows: list[tuple[str, str]] = []
    if sheet.vout_nominal is not None:
        band = ""
        if sheet.vout_low is not None and sheet.vout_high is not None:
            band = f" (worst case {_fmt(sheet.vout_low, 'voltage', 4)} … "
            band += f"{_fmt(sheet.vout_high, 'voltage', 4)})"
        rows.append(("output voltage", _fmt(sheet.vout_nominal, "voltage", 4) + band))
    else:
        rows.append(("output voltage", "no divider chosen: set by the controller"))
    for c in sheet.corners:
        at = f"at Vin {_fmt(c.vin, 'voltage')}"
        rows.append((f"duty cycle {at}", f"{100 * c.duty:.1f} %"))
        rows.append(
            (
                f"ripple {at}",
                f"{_fmt(c.ripple_pp, 'current')} p-p in the inductor = "
                f"{sheet.ripple_mv(c):.3g} mV p-p across "
                f"{_fmt(sheet.sense_resistance, 'resistance')}",
            )
        )
        rows.append((f"peak inductor current {at}", _fmt(c.i_peak, "current")))
    if sheet.ccm_min_load is not None:
        rows.append(("lowest load for continuous conduction", _fmt(sheet.ccm_min_load, "current")))
    rows.append(
        (
            "expected inductor temperature rise",
            "unknown (no thermal reading)"
            if sheet.temp_rise is None
            else f"{sheet.temp_rise:.1f} K",
        )
    )
    rows.append(
        (
            "saturation margin (Isat / Ipk)",
            "unknown" if sheet.sat_margin is None else f"{sheet.sat_margin:.2f} ×",
        )
    )
    rows.extend(("note", n) for n in sheet.notes)
    return rows


def _title(sheet: PickSheet) -> str:
    ident = f" #{sheet.pick_id}" if sheet.pick_id is not None else ""
    return f"Pick list{ident}: {sheet.plan} × {sheet.boards} board" + (
        "s" if sheet.boards != 1 else ""
    )


def _status(sheet: PickSheet) -> str:
    if sheet.complete:
        return f"state {sheet.state}; every role can be filled"
    short = ", ".join(
        f"{ln.role} short by {ln.shortfall}" if ln.label else f"{ln.role}: nothing fits"
        for ln in sheet.lines
        if not ln.label or ln.shortfall
    )
    return f"state {sheet.state}; SHORTFALL: {short}"


# -- text ------------------------------------------------------------------------------


def render_text(sheet: PickSheet) -> str:
    """Plain text for a terminal or a printer (monospaced columns)."""
    out = [_title(sheet)]
    if sheet.summary:
        out.append(sheet.summary)
    out.append(_status(sheet))
    out.append("")
    # the long "note" column goes below the table, one line per role
    cols = len(COLUMNS) - 1
    cells = [list(COLUMNS[:cols])] + [line_cells(ln)[:cols] for ln in sheet.lines]
    widths = [max(len(row[i]) for row in cells) for i in range(cols)]
    for k, row in enumerate(cells):
        out.append("  ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)).rstrip())
        if k == 0:
            out.append("  ".join("-" * w for w in widths))
    notes = [(ln.role, ln.note) for ln in sheet.lines if ln.note]
    if notes:
        out += ["", "Why"]
        out += [f"- {role}: {note}" for role, note in notes]
    out.extend(f"note: {n}" for n in sheet.extra_notes)
    if sheet.bring_up is not None:
        out += ["", "Bring-up sheet", "--------------"]
        rows = bring_up_rows(sheet.bring_up)
        w = max(len(k) for k, _ in rows)
        out += [f"{k.ljust(w)}  {v}" for k, v in rows]
        out += ["", "Safety"]
        out += [f"- {c}" for c in sheet.bring_up.cautions]
    return "\n".join(out) + "\n"


# -- CSV -------------------------------------------------------------------------------

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def csv_safe(cell: str) -> str:
    """Neutralise a cell a spreadsheet would run as a formula (leading apostrophe)."""
    return "'" + cell if cell.startswith(_FORMULA_START) else cell


def render_csv(sheet: PickSheet) -> str:
    """CSV: one header row, one row per pick line, then the bring-up items."""
    buf = io.StringIO()
    # CRLF rows (RFC 4180): a CR or LF inside a cell is then always quoted
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow([csv_safe(c) for c in ("section", *COLUMNS)])
    for ln in sheet.lines:
        w.writerow([csv_safe(c) for c in ("pick", *line_cells(ln))])
    if sheet.bring_up is not None:
        for k, v in bring_up_rows(sheet.bring_up):
            w.writerow([csv_safe(c) for c in ("bring-up", k, v)])
        for c in sheet.bring_up.cautions:
            w.writerow([csv_safe(x) for x in ("safety", c)])
    return buf.getvalue()


# -- Markdown --------------------------------------------------------------------------


def _md(cell: str) -> str:
    return cell.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def render_markdown(sheet: PickSheet) -> str:
    """GitHub-flavoured Markdown with a table per section."""
    out = [f"# {_md(_title(sheet))}", ""]
    if sheet.summary:
        out += [_md(sheet.summary), ""]
    out += [_md(_status(sheet)), ""]
    out.append("| " + " | ".join(COLUMNS) + " |")
    out.append("|" + "---|" * len(COLUMNS))
    for ln in sheet.lines:
        out.append("| " + " | ".join(_md(c) for c in line_cells(ln)) + " |")
    for n in sheet.extra_notes:
        out += ["", f"*Note:* {_md(n)}"]
    if sheet.bring_up is not None:
        out += ["", "## Bring-up sheet", "", "| item | expect |", "|---|---|"]
        out += [f"| {_md(k)} | {_md(v)} |" for k, v in bring_up_rows(sheet.bring_up)]
        out += ["", "## Safety", ""]
        out += [f"- {_md(c)}" for c in sheet.bring_up.cautions]
    return "\n".join(out) + "\n"


# -- HTML ------------------------------------------------------------------------------

_STYLE = """
body { font-family: sans-serif; margin: 1.5em; color: #111; }
table { border-collapse: collapse; margin: 0.5em 0 1.2em; font-size: 0.9em; }
th, td { border: 1px solid #888; padding: 0.25em 0.5em; text-align: left; vertical-align: top; }
th { background: #eee; }
tr.short td { background: #fde2e2; }
.status { font-weight: bold; }
.safety li { margin-bottom: 0.3em; }
@media print { body { margin: 0.5cm; } a { color: inherit; } }
"""


def _h(text: str) -> str:
    return html.escape(text, quote=True)


def render_html(sheet: PickSheet) -> str:
    """One self-contained printable HTML file (inline style, escaped text, no scripts)."""
    title = _h(_title(sheet))
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{title}</title>",
        f"<style>{_STYLE}</style>",
        "</head><body>",
        f"<h1>{title}</h1>",
    ]
    if sheet.summary:
        out.append(f"<p>{_h(sheet.summary)}</p>")
    out.append(f'<p class="status">{_h(_status(sheet))}</p>')
    out.append("<table><thead><tr>" + "".join(f"<th>{_h(c)}</th>" for c in COLUMNS))
    out.append("</tr></thead><tbody>")
    for ln in sheet.lines:
        cls = ' class="short"' if (ln.shortfall or not ln.label) else ""
        out.append(f"<tr{cls}>" + "".join(f"<td>{_h(c)}</td>" for c in line_cells(ln)) + "</tr>")
    out.append("</tbody></table>")
    for n in sheet.extra_notes:
        out.append(f"<p><em>Note:</em> {_h(n)}</p>")
    if sheet.bring_up is not None:
        out.append("<h2>Bring-up sheet</h2><table><tbody>")
        for k, v in bring_up_rows(sheet.bring_up):
            out.append(f"<tr><th>{_h(k)}</th><td>{_h(v)}</td></tr>")
        out.append('</tbody></table><h2>Safety</h2><ul class="safety">')
        out += [f"<li>{_h(c)}</li>" for c in sheet.bring_up.cautions]
        out.append("</ul>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def sheet_dict(sheet: PickSheet) -> dict:
    """The pick list as plain data (SI numbers), the ``--format json`` of ``kitbin pick``.

    Keys: ``plan``, ``topology``, ``boards``, ``state``, ``pick_id``, ``summary``,
    ``complete``, ``lines`` (each ``role``, ``bin``, ``part``, ``per_board``, ``total``,
    ``on_hand``, ``available``, ``shortfall``, ``kit``, ``location``, ``recognise``,
    ``verdict``, ``note``), ``bring_up`` (``vout_V``, ``vout_band_V``, ``corners`` with
    ``vin_V``, ``duty``, ``ripple_App``, ``ripple_mVpp_across_sense``, ``i_peak_A``,
    ``ccm_min_load_A``; ``sense_ohm``, ``temp_rise_K``, ``sat_margin``, ``notes``) or
    null, and ``cautions``.
    """
    b = sheet.bring_up
    bring_up = None
    if b is not None:
        bring_up = {
            "vout_V": b.vout_nominal,
            "vout_band_V": [b.vout_low, b.vout_high],
            "corners": [
                {
                    "vin_V": c.vin,
                    "duty": c.duty,
                    "ripple_App": c.ripple_pp,
                    "ripple_mVpp_across_sense": b.ripple_mv(c),
                    "i_peak_A": c.i_peak,
                    "ccm_min_load_A": c.ccm_min_load,
                }
                for c in b.corners
            ],
            "sense_ohm": b.sense_resistance,
            "temp_rise_K": b.temp_rise,
            "sat_margin": b.sat_margin,
            "notes": list(b.notes),
        }
    return {
        "plan": sheet.plan,
        "topology": sheet.topology,
        "boards": sheet.boards,
        "state": sheet.state,
        "pick_id": sheet.pick_id,
        "summary": sheet.summary,
        "complete": sheet.complete,
        "lines": [
            {
                "role": ln.role,
                "bin": ln.label,
                "part": ln.description,
                "per_board": ln.qty_per_board,
                "total": ln.qty_total,
                "on_hand": ln.on_hand,
                "available": ln.available,
                "shortfall": ln.shortfall,
                "kit": ln.kit,
                "location": ln.location,
                "recognise": ln.recognise,
                "verdict": ln.verdict,
                "note": ln.note,
            }
            for ln in sheet.lines
        ],
        "bring_up": bring_up,
        "cautions": list(b.cautions if b is not None else SAFETY_CAUTIONS),
    }


def render_json(sheet: PickSheet) -> str:
    """The pick list as indented JSON (see :func:`sheet_dict`)."""
    import json

    return json.dumps(sheet_dict(sheet), indent=2, ensure_ascii=False) + "\n"


RENDERERS = {
    "text": render_text,
    "csv": render_csv,
    "md": render_markdown,
    "html": render_html,
    "json": render_json,
}


def render(sheet: PickSheet, fmt: str) -> str:
    """Render in one of :data:`RENDERERS` (``text``, ``csv``, ``md``, ``html``).

    Raises
    ------
    ValueError
        For an unknown format name.
    """
    try:
        return RENDERERS[fmt](sheet)
    except KeyError:
        raise ValueError(f"format {fmt!r}: expected one of {', '.join(RENDERERS)}") from None


# -- how to recognise a part -----------------------------------------------------------


def recognise(
    kind: str,
    nominal: float | None,
    tolerance: float | None,
    marking: str | None,
    package: str | None,
) -> str:
    """A short description of how to recognise a bin's parts.

    Resistors get their IEC 60062 colour bands from the nominal value and
    tolerance (encoder in :mod:`kitbin.markings.colour`); other parts show the
    marking as printed and the body size.
    """
    bits: list[str] = []
    if marking:
        bits.append(f"marked {marking}")
    if kind == "resistor" and nominal:
        from kitbin.errors import MarkingError
        from kitbin.markings.colour import encode_bands

        try:
            bands = encode_bands(nominal, tolerance if tolerance else None)
            text = "-".join(bands)
            if not marking or text not in marking:
                bits.append(f"bands {text}")
        except (MarkingError, ValueError):
            pass
    if package:
        bits.append(package)
    return "; ".join(bits)


def describe_part(kind: str, nominal: float | None) -> str:
    """E.g. "10.0 µH inductor", "4.70 kΩ resistor", "diode"."""
    dim = {"inductor": "inductance", "resistor": "resistance", "capacitor": "capacitance"}.get(kind)
    if nominal and dim:
        return f"{format_quantity(nominal, dim)} {kind}"
    return kind


def sheet_lines_from(
    lines: Sequence[PickLine],
) -> tuple[PickLine, ...]:
    """Order pick lines for picking: by kit, then location, then role."""
    return tuple(sorted(lines, key=lambda ln: (ln.label is None, ln.kit, ln.location, ln.role)))
