"""The spec options shared by ``kitbin stage``, ``kitbin plan new`` and ``kitbin plan edit``.

One ``--OPTION TEXT`` per field of a converter spec; the text is parsed with its unit
by :func:`kitbin.services.plans.parse_spec_texts`.
"""

import functools
import inspect
from collections.abc import Callable, Iterable
from typing import Any

import typer

SPEC_HELP: dict[str, str] = {
    "--topology": "buck, boost or invert.",
    "--vin": "Input range, e.g. 11..15V (or one value).",
    "--vout": "Output voltage (magnitude for invert).",
    "--iout": "Full load, e.g. 2.4A.",
    "--iout-min": "Light load (default 10 % of --iout).",
    "--fsw": "Switching frequency, e.g. 500kHz.",
    "--vf": "Diode forward drop (default 0.4V).",
    "--rsw": "Switch on-resistance (default 0).",
    "--sync": "Synchronous rectifier with this low-side resistance, e.g. 30mohm.",
    "--rectifier": "diode or sync.",
    "--ripple": "Target r = ΔI/IL at full load (default 0.3).",
    "--vout-ripple": "Allowed output ripple p-p (default 1 % of Vout).",
    "--vin-ripple": "Allowed input ripple p-p (default 2 % of Vin,min).",
    "--ambient": "Ambient temperature (default 25 °C).",
    "--rise-max": "Allowed inductor rise (default 40K).",
    "--isat-drop": "Isat criterion: 10, 20 or 30 % drop (default 20).",
    "--isat-margin": "Isat as a multiple of the peak (default 1.25).",
    "--vout-tol": "Allowed output error (default 3%).",
    "--ilim": "Controller current limit.",
    "--ton-min": "Controller minimum on-time.",
    "--d-max": "Controller maximum duty.",
    "--vref": "Controller reference voltage.",
    "--vref-tol": "Reference tolerance.",
    "--ifb": "Feedback-pin current.",
    "--ilim-gain": "Current-limit set gain (V): Ilim = gain / Rset.",
    "--ilim-target": "Current limit wanted from the set resistor.",
    "--rbottom": "Range for the divider's bottom resistor, e.g. 4.7k..47k (default 1k..100k).",
}


def _is_argument(param: inspect.Parameter) -> bool:
    from typer.models import ArgumentInfo

    return isinstance(param.default, ArgumentInfo)


def _param_name(option: str) -> str:
    return "spec_" + option[2:].replace("-", "_")


def spec_options(
    *, exclude: Iterable[str] = (), required: Iterable[str] = ()
) -> Callable[[Callable[..., None]], Callable[..., None]]:
    """Give a command one ``--OPTION TEXT`` per spec field of :data:`SPEC_HELP` (less
    ``exclude``; those in ``required`` must be given).

    Typer reads options from a function's signature, so the spec options are added
    to the signature here once instead of being written out in every command; the
    command receives them as ``spec``, a dict of option name -> text (None if not given).
    """
    skip, needed = set(exclude), set(required)
    options = [o for o in SPEC_HELP if o not in skip]

    def decorate(command: Callable[..., None]) -> Callable[..., None]:
        own = [p for p in inspect.signature(command).parameters.values() if p.name != "spec"]
        added = [
            inspect.Parameter(
                _param_name(option),
                inspect.Parameter.KEYWORD_ONLY,
                default=typer.Option(
                    ... if option in needed else None, option, help=SPEC_HELP[option]
                ),
                annotation=str if option in needed else str | None,
            )
            for option in options
        ]

        @functools.wraps(command)
        def with_spec(**kwargs: Any) -> None:
            spec = {option: kwargs.pop(_param_name(option)) for option in options}
            command(spec=spec, **kwargs)

        # the context and arguments first, then the spec options, then the command's own
        first = [p for p in own if p.annotation is typer.Context or _is_argument(p)]
        ordered = [*first, *added, *(p for p in own if p not in first)]
        # Typer passes every value by name, so all may be keyword-only
        params = [p.replace(kind=inspect.Parameter.KEYWORD_ONLY) for p in ordered]
        with_spec.__signature__ = inspect.Signature(params)  # type: ignore[attr-defined]
        with_spec.__annotations__ = {p.name: p.annotation for p in params}
        return with_spec

    return decorate
