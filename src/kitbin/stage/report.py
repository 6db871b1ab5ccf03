"""Plain JSON-ready records of corners and demands (the documented ``--json`` keys).

Keys carry their unit as a suffix (``_V``, ``_A``, ``_App`` for peak-to-peak amperes,
``_Vpp``, ``_s``, ``_W``, ``_H``); every key is described in ``docs/power-stage.md``.
Values that need a part that was not given are ``None`` (JSON ``null``), and an
infinite value is ``None`` too.
"""

from __future__ import annotations

import math
from typing import Any

from kitbin.stage.demands import Constraint, Demand, demands
from kitbin.stage.operating import Corner, Parts, corners, l_min
from kitbin.stage.spec import Spec


def _num(value: float | None) -> float | None:
    if value is None or not math.isfinite(value):
        return None
    return float(value)


#: Corner record key -> Corner attribute.
CORNER_KEYS: dict[str, str] = {
    "vin_V": "vin",
    "iout_A": "iout",
    "duty": "duty",
    "d2": "d2",
    "on_time_s": "on_time",
    "il_avg_A": "il_avg",
    "ripple_App": "ripple_pp",
    "ripple_ratio": "ripple_ratio",
    "i_peak_A": "i_peak",
    "i_valley_A": "i_valley",
    "i_rms_A": "il_rms",
    "isw_rms_A": "isw_rms",
    "isw_avg_A": "isw_avg",
    "v_switch_V": "v_switch",
    "diode_iavg_A": "id_avg",
    "diode_irms_A": "id_rms",
    "diode_ipk_A": "id_peak",
    "diode_vr_V": "v_reverse",
    "i_cin_rms_A": "icin_rms",
    "i_cout_rms_A": "icout_rms",
    "ccm_min_load_A": "ccm_min_load",
    "vout_ripple_Vpp": "vout_ripple",
    "vout_ripple_cap_Vpp": "vout_ripple_c",
    "vout_ripple_esr_Vpp": "vout_ripple_esr",
    "vout_ripple_bound_Vpp": "vout_ripple_sum",
    "vin_ripple_Vpp": "vin_ripple",
    "vin_ripple_cap_Vpp": "vin_ripple_c",
    "p_switch_W": "p_switch",
    "p_rect_W": "p_rect",
    "p_inductor_W": "p_inductor",
    "p_cout_W": "p_cout",
    "p_cin_W": "p_cin",
}


def corner_record(c: Corner) -> dict[str, Any]:
    """One corner as a dict of the documented keys."""
    out: dict[str, Any] = {"name": c.name, "mode": c.mode}
    for key, attr in CORNER_KEYS.items():
        out[key] = _num(getattr(c, attr))
    out["flags"] = list(c.flags)
    return out


def constraint_record(c: Constraint) -> dict[str, Any]:
    """One constraint as a dict."""
    return {
        "quantity": c.quantity,
        "op": c.op,
        "limit": _num(c.limit),
        "reason": c.reason,
        "source": c.source,
    }


def demands_record(all_demands: tuple[Demand, ...]) -> dict[str, Any]:
    """Demands keyed by role: ``{"role": {"constraints": [...], "notes": [...]}}``."""
    return {
        d.role: {
            "constraints": [constraint_record(c) for c in d.constraints],
            "notes": list(d.notes),
        }
        for d in all_demands
    }


def stage_report(
    spec: Spec,
    l_henry: float | None = None,
    dcr: float = 0.0,
    cout: float | None = None,
    esr: float = 0.0,
    cin: float | None = None,
    esr_in: float = 0.0,
) -> dict[str, Any]:
    """Corners and demands of a spec, as the ``--json`` record.

    Parameters
    ----------
    spec
        The specification.
    l_henry
        Inductance (H); None uses the smallest inductance allowed by the ripple
        target (``inductance_source`` is then ``"l_min"``).
    dcr
        Inductor DC resistance (Ω).
    cout, esr, cin, esr_in
        Output and input capacitance (F) and ESR (Ω); None skips their ripple.
    """
    lm, vin_lm = l_min(spec)
    source = "l_min" if l_henry is None else "given"
    parts = Parts(
        inductance=lm if l_henry is None else l_henry,
        dcr=dcr,
        cout=cout,
        esr=esr,
        cin=cin,
        esr_in=esr_in,
    )
    cs = corners(spec, parts)
    dem = demands(spec, l_henry, dcr)
    return {
        "topology": spec.topology,
        "inductance_H": parts.inductance,
        "inductance_source": source,
        "l_min_H": lm,
        "l_min_vin_V": vin_lm,
        "ripple_ratio_target": spec.ripple_ratio,
        "corners": [corner_record(c) for c in cs],
        "demands": demands_record(dem),
    }
