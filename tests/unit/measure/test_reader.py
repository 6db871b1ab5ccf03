"""The capture reader: layouts bench instruments write, units, and one-line errors."""

from __future__ import annotations

import numpy as np
import pytest

from kitbin.errors import CaptureError
from kitbin.measure.reader import read_capture, sniff

T = np.arange(40) * 1e-6
V = np.linspace(0.0, 0.39, 40)


def _rows(sep: str, decimal: str = ".", t_scale: float = 1.0, v_scale: float = 1.0) -> list[str]:
    out = []
    for t, v in zip(T, V, strict=True):
        a, b = f"{t * t_scale:.6g}", f"{v * v_scale:.6g}"
        if decimal == ",":
            a, b = a.replace(".", ","), b.replace(".", ",")
        out.append(f"{a}{sep}{b}")
    return out


@pytest.mark.parametrize(
    ("sep", "decimal"),
    [(",", "."), (";", "."), (";", ","), ("\t", "."), ("\t", ","), ("  ", "."), (" ", ",")],
)
def test_delimiters_and_decimal_marks(sep: str, decimal: str) -> None:
    text = "\n".join([f"time{sep}ch1", *_rows(sep, decimal)]) + "\n"
    cap = read_capture(text)
    np.testing.assert_allclose(cap.time, T, rtol=1e-9, atol=1e-15)
    np.testing.assert_allclose(cap.channels["ch1"], V, rtol=1e-9)
    assert cap.layout.decimal == decimal


def test_metadata_lines_and_units_in_names_are_scaled_to_si() -> None:
    text = "\n".join(
        [
            "Instrument export (invented)",
            "Record length,40",
            "Vertical scale,50mV/div",
            "",
            '"Time (us)","CH1 [mV]","CH2 (V)"',
            *[f"{t * 1e6:.6g},{v * 1e3:.6g},{2 * v:.6g}" for t, v in zip(T, V, strict=True)],
        ]
    )
    cap = read_capture(text)
    assert cap.time_source == "column 'Time (us)'"
    np.testing.assert_allclose(cap.time, T, rtol=1e-9)
    np.testing.assert_allclose(cap.channels["CH1 [mV]"], V, rtol=1e-9)
    assert cap.units == {"CH1 [mV]": "V", "CH2 (V)": "V"}
    assert cap.layout.metadata[0] == "Instrument export (invented)"
    # a channel by its name without the unit, or by its file column number
    assert cap.channel("CH2")[0] == "CH2 (V)"
    assert cap.channel(2)[0] == "CH1 [mV]"


def test_slash_units_minutes_and_kelvin() -> None:
    text = "t/min\tT/K\n" + "\n".join(f"{k / 60:.6g}\t{293.15 + k:.6g}" for k in range(20))
    cap = read_capture(text)
    np.testing.assert_allclose(cap.time, np.arange(20.0), atol=1e-4)
    np.testing.assert_allclose(cap.channels["T/K"], 20.0 + np.arange(20.0), atol=1e-9)


def test_no_header_first_column_steady_is_time() -> None:
    cap = read_capture("\n".join(_rows(",")))
    assert cap.layout.has_header is False
    assert cap.time_source == "column 'column 1'"
    np.testing.assert_allclose(cap.channels["column 2"], V)
    assert cap.notes == ("time column 'column 1' names no unit: read as seconds",)


def test_no_time_column_needs_dt() -> None:
    text = "CH1;CH2\n" + "\n".join(f"{v:.6g};{-v:.6g}" for v in V[::-1])
    with pytest.raises(CaptureError, match="no time column"):
        read_capture(text)
    cap = read_capture(text, dt=2e-9)
    np.testing.assert_allclose(cap.time, np.arange(40) * 2e-9)
    assert cap.time_source == "dt"
    assert list(cap.channels) == ["CH1", "CH2"]


def test_sample_interval_found_in_metadata() -> None:
    text = "sample interval: 4 ns\nCH1\n" + "\n".join(f"{v:.6g}" for v in V)
    cap = read_capture(text)
    np.testing.assert_allclose(cap.dt, 4e-9)
    assert cap.time_source == "metadata interval"
    assert "taken from the file's metadata" in cap.notes[0]


def test_dt_given_skips_a_time_column_and_a_sample_counter() -> None:
    text = "n,CH1\n" + "\n".join(f"{k},{v:.6g}" for k, v in enumerate(V))
    cap = read_capture(text, dt=1e-9)
    assert list(cap.channels) == ["CH1"]


def test_columns_by_name_and_position() -> None:
    text = "time,a,b,c\n" + "\n".join(
        f"{t:.6g},{v},{2 * v},{3 * v}" for t, v in zip(T, V, strict=True)
    )
    cap = read_capture(text, columns=["c", 2])
    assert list(cap.channels) == ["c", "a"]
    np.testing.assert_allclose(cap.channels["c"], 3 * V)


def test_crlf_bom_trailing_delimiter_and_blank_lines() -> None:
    body = "\r\n".join(f"{r};" for r in _rows(";"))
    text = "\ufefftime;ch1;\r\n\r\n" + body + "\r\n\r\n"
    cap = read_capture(text.encode("utf-8"))
    np.testing.assert_allclose(cap.channels["ch1"], V)


def test_footer_text_after_the_data_is_dropped() -> None:
    text = "time,ch1\n" + "\n".join(_rows(",")) + "\nend of record\n"
    cap = read_capture(text)
    assert cap.n == 40


def test_short_missing_gaps_are_bridged() -> None:
    rows = _rows(",")
    rows[10] = f"{T[10]:.6g},nan"
    cap = read_capture("time,ch1\n" + "\n".join(rows))
    assert cap.channels["ch1"][10] == pytest.approx(V[10], rel=1e-6)


def test_sniff_reads_only_the_head() -> None:
    layout = sniff(("time,ch1\n" + ("\n".join(_rows(",")) + "\n") * 2000).encode())
    assert layout.delimiter == "," and layout.has_header and layout.n_fields == 2


# -- errors: one line naming the input and what was expected -------------------------


@pytest.mark.parametrize(
    ("content", "message"),
    [
        (b"", "the file is empty"),
        (b"  \n\n  ", "the file is empty"),
        (b"just some words\nand more words\n", "no numeric data"),
        ("time,ch1\n" + "\n".join(_rows(",")[:5]), "only 5 samples"),
    ],
)
def test_bad_files(content, message: str) -> None:
    with pytest.raises(CaptureError, match=message) as info:
        read_capture(content, source="x.csv")
    assert "\n" not in str(info.value)
    assert str(info.value).startswith("x.csv: ")


def test_time_going_backwards() -> None:
    rows = _rows(",")
    rows[20], rows[21] = rows[21], rows[20]
    with pytest.raises(CaptureError, match="time does not increase at sample 22"):
        read_capture("time,ch1\n" + "\n".join(rows))


def test_nan_run() -> None:
    rows = _rows(",")
    for k in range(10, 16):
        rows[k] = f"{T[k]:.6g},NaN"
    with pytest.raises(CaptureError, match="run of 6 missing values from sample 11"):
        read_capture("time,ch1\n" + "\n".join(rows))


def test_missing_column_lists_the_columns_found() -> None:
    text = "Time (s),CH1 [V]\n" + "\n".join(_rows(","))
    with pytest.raises(CaptureError) as info:
        read_capture(text, columns=["CH3"])
    assert str(info.value) == (
        "capture: there is no column 'CH3' (columns found: 1 'Time (s)', 2 'CH1 [V]')"
    )
    with pytest.raises(CaptureError, match="there is no column 5"):
        read_capture(text, columns=[5])


def test_stray_text_inside_the_data() -> None:
    rows = _rows(",")
    rows[12] = "overrange,overrange"
    with pytest.raises(CaptureError, match="line 14 inside the data is not numeric"):
        read_capture("time,ch1\n" + "\n".join(rows))
