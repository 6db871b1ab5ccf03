"""Power-stage arithmetic: pure functions over frozen dataclasses (SI units, no I/O).

Public API (names kept stable for the matcher):

* :mod:`~kitbin.stage.spec` — :class:`Spec`, :class:`ExtraPart`, :func:`spec_from_dict`
* :mod:`~kitbin.stage.operating` — :class:`Parts`, :class:`Corner`, :func:`operate`,
  :func:`corners`, :func:`solve`, :func:`l_min`, :func:`ccm_min_load`
* :mod:`~kitbin.stage.demands` — :class:`Constraint`, :class:`Demand`,
  :class:`InductorOperating`, :func:`demands`, :func:`inductor_duty`,
  :func:`output_ripple`
* :mod:`~kitbin.stage.thermal` — :func:`predicted_rise`, :func:`r_at`, ...
* :mod:`~kitbin.stage.divider` — :func:`divider_output`
* :mod:`~kitbin.stage.stepping` — :class:`LCurve`, :func:`step_corner` (numpy)
"""

from kitbin.stage.demands import (
    ROLES,
    Constraint,
    Demand,
    InductorOperating,
    candidate_rise,
    demand_for,
    demands,
    inductor_duty,
    output_ripple,
    plan_current_limit,
)
from kitbin.stage.divider import DividerOutput, divider_output
from kitbin.stage.operating import (
    Corner,
    Parts,
    ccm_min_load,
    corner_points,
    corners,
    l_min,
    operate,
    solve,
)
from kitbin.stage.spec import ExtraPart, Spec, spec_from_dict
from kitbin.stage.thermal import ALPHA_CU_20, predicted_rise, r_at, runaway_current

__all__ = [
    "ALPHA_CU_20",
    "ROLES",
    "Constraint",
    "Corner",
    "Demand",
    "DividerOutput",
    "ExtraPart",
    "InductorOperating",
    "Parts",
    "Spec",
    "candidate_rise",
    "ccm_min_load",
    "corner_points",
    "corners",
    "demand_for",
    "demands",
    "divider_output",
    "inductor_duty",
    "l_min",
    "operate",
    "output_ripple",
    "plan_current_limit",
    "predicted_rise",
    "r_at",
    "runaway_current",
    "solve",
    "spec_from_dict",
]
