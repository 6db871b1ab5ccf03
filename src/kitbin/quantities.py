"""Names of the quantities kitbin records on bins, with their physical dimension.

This is the one vocabulary shared by readings, bin properties, evidence, the
matcher, the command line and the UI. Dimensions are the names understood by
:func:`kitbin.units.parse_quantity`.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class QuantityKind:
    """One recordable quantity: its name, dimension and what it means."""

    name: str
    dimension: str
    meaning: str
    #: True for quantities where a larger value is the safe side for a matcher
    #: (ratings: Isat, rated voltage); False where smaller is safe (DCR, ESR).
    higher_is_better: bool = True


_ALL = [
    QuantityKind("inductance", "inductance", "inductance at low bias (H)"),
    QuantityKind("dcr", "resistance", "DC resistance of a winding (ohm)", False),
    QuantityKind("isat_10", "current", "current at which L has fallen 10 % (A)"),
    QuantityKind("isat_20", "current", "current at which L has fallen 20 % (A)"),
    QuantityKind("isat_30", "current", "current at which L has fallen 30 % (A)"),
    QuantityKind("i_rise", "current", "DC current giving the allowed temperature rise (A)"),
    QuantityKind("r_th", "thermal_resistance", "thermal resistance to ambient (K/W)", False),
    QuantityKind("tau_th", "time", "thermal time constant (s)"),
    QuantityKind(
        "rise", "temperature_rise", "steady temperature rise at a test current (K)", False
    ),
    QuantityKind("resistance", "resistance", "resistance (ohm)"),
    QuantityKind("capacitance", "capacitance", "capacitance (F)"),
    QuantityKind("esr", "resistance", "equivalent series resistance (ohm)", False),
    QuantityKind("rated_voltage", "voltage", "rated (working) voltage (V)"),
    QuantityKind("rated_power", "power", "rated power dissipation (W)"),
    QuantityKind("rated_current", "current", "rated continuous current (A)"),
    QuantityKind("vf", "voltage", "diode forward voltage at a test current (V)", False),
    QuantityKind("vrrm", "voltage", "diode repetitive peak reverse voltage (V)"),
    QuantityKind("if_avg", "current", "diode average forward current rating (A)"),
    QuantityKind("vref", "voltage", "controller feedback reference voltage (V)"),
    QuantityKind("vref_tol", "ratio", "controller reference tolerance (fraction)", False),
    QuantityKind("ifb", "current", "controller feedback pin input current (A)", False),
    QuantityKind("fsw", "frequency", "controller switching frequency (Hz)"),
    QuantityKind("ilim", "current", "controller switch current limit (A)"),
    QuantityKind("ilim_gain", "voltage", "current-limit set gain: ilim = ilim_gain / Rset (V)"),
    QuantityKind("vin_min", "voltage", "controller lowest input voltage (V)", False),
    QuantityKind("vin_max", "voltage", "controller highest input voltage (V)"),
    QuantityKind("ton_min", "time", "controller minimum on-time (s)", False),
    QuantityKind("d_max", "ratio", "controller maximum duty cycle (fraction)"),
    QuantityKind("rds_on", "resistance", "switch on-resistance (ohm)", False),
    QuantityKind("i_ripple", "current", "capacitor ripple-current rating (A rms)"),
    QuantityKind("if_peak", "current", "diode repetitive peak forward current rating (A)"),
    # Derived for a candidate by the matcher, not recorded (stage.demands says how):
    QuantityKind(
        "rise_load",
        "temperature_rise",
        "predicted steady rise at the plan's RMS current, from dcr and r_th (K)",
        False,
    ),
    QuantityKind("divider_ratio", "ratio", "feedback divider ratio Rtop/Rbot"),
    QuantityKind("divider_sum", "resistance", "feedback divider total Rtop + Rbot (ohm)", False),
]

QUANTITIES: dict[str, QuantityKind] = {q.name: q for q in _ALL}

#: Aliases people type for the same quantity.
ALIASES: dict[str, str] = {
    "l": "inductance",
    "r": "resistance",
    "c": "capacitance",
    "isat": "isat_20",
    "vr": "vrrm",
    "if": "if_avg",
    "rdson": "rds_on",
}

#: The value a bin's nominal and marking describe, by kind of part.
NOMINAL_QUANTITY: dict[str, str] = {
    "inductor": "inductance",
    "resistor": "resistance",
    "capacitor": "capacitance",
}

PART_KINDS = ("inductor", "resistor", "capacitor", "diode", "controller", "other")

#: Test-condition names of a reading (``--at freq=100kHz``) and their dimensions,
#: including those the bench analysis writes (``drop``, ``rise_limit``).
CONDITIONS: dict[str, str] = {
    "freq": "frequency",
    "temp": "temperature",
    "ambient": "temperature",
    "bias": "current",
    "idc": "current",
    "iac": "current",
    "vbias": "voltage",
    "vdc": "voltage",
    "vac": "voltage",
    "level": "voltage",
    "duration": "time",
    "drop": "ratio",
    "rise_limit": "temperature_rise",
}

#: Short names people type for a condition.
CONDITION_ALIASES: dict[str, str] = {
    "f": "freq",
    "t": "temp",
    "i": "bias",
    "v": "vbias",
    "frequency": "freq",
}


def quantity_kind(name: str) -> QuantityKind:
    """Look up a quantity by name or alias (case-insensitive).

    Raises
    ------
    KeyError
        When the name is not a known quantity.
    """
    key = name.strip().lower()
    key = ALIASES.get(key, key)
    return QUANTITIES[key]
