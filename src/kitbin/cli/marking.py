"""``kitbin marking TEXT --kind KIND``: read a part marking without adding a bin."""

import typer

from kitbin.cli.common import print_json

#: Schemes tried when showing how else the same value may be marked.
_OTHER_SCHEMES = ("colour", "numeric", "rkm", "e96")


def register(app: typer.Typer) -> None:
    """Add ``kitbin marking`` to the root app."""

    @app.command("marking")
    def marking(
        text: str = typer.Argument(
            ..., help="The marking as printed, e.g. 'yellow violet red gold'."
        ),
        kind: str = typer.Option(..., "--kind", help="resistor, capacitor or inductor."),
        scheme: str | None = typer.Option(
            None, "--scheme", help="colour, numeric, rkm or e96 (default: recognised)."
        ),
        as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    ) -> None:
        """Decode a colour code, numeric, RKM or E96 marking (IEC 60062) and show the
        other ways the same value is marked.

        Example: kitbin marking "yellow violet red gold" --kind resistor
        """
        from kitbin.errors import KitbinError
        from kitbin.markings import decode_marking, encode_marking, format_si, nearest_preferred

        found = decode_marking(text, kind, scheme)
        tolerance = (
            (found.tol_minus, found.tol_plus)
            if found.tol_minus is not None and found.tol_plus is not None
            else None
        )
        others: dict[str, str] = {}
        for other in _OTHER_SCHEMES:
            if other == found.scheme:
                continue
            try:
                others[other] = encode_marking(found.value, kind, other, tolerance)
            except KitbinError:
                continue  # that scheme cannot say this value (and tolerance) exactly
        series = {name: nearest_preferred(found.value, name) for name in ("E12", "E24", "E96")}
        if as_json:
            print_json(
                {
                    "text": found.text,
                    "kind": kind,
                    "scheme": found.scheme,
                    "value": found.value,
                    "tol_minus": found.tol_minus,
                    "tol_plus": found.tol_plus,
                    "tcr_ppm": found.tcr_ppm,
                    "reversed": found.reversed,
                    "also_marked": others,
                    "nearest_preferred": series,
                }
            )
            return
        typer.echo(f"{found.text}: {found.describe()}")
        if found.reversed:
            typer.echo("  read from the other end than written")
        for other, code in others.items():
            typer.echo(f"  as {other}: {code}")
        unit = {"resistor": "Ω", "capacitor": "F", "inductor": "H"}[kind]
        nearest = ", ".join(f"{n} {format_si(v, unit)}" for n, v in series.items())
        typer.echo(f"  nearest preferred values: {nearest}")
