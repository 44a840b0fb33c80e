"""Property tests of the CSV export: numbers stay numbers in both styles, text never starts a
formula (OWASP "CSV injection": a cell starting = + - @ tab or CR is run by spreadsheets)."""

from __future__ import annotations

import csv
import io
import re

from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit.jobs.models import Job, Link, LossResult
from fieldkit.reports import to_csv

PLAIN_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
STYLES = {"comma": ",", "semicolon": ";"}


def _rows(job: Job, style: str) -> list[dict[str, str]]:
    text = to_csv(job, style=style)
    return list(csv.DictReader(io.StringIO(text), delimiter=STYLES[style]))


@settings(max_examples=200, deadline=None)
@given(
    loss=st.floats(min_value=-50.0, max_value=80.0, allow_nan=False),
    style=st.sampled_from(sorted(STYLES)),
)
def test_a_loss_is_written_as_a_number_in_either_style(loss: float, style: str) -> None:
    job = Job(
        name="J",
        links=[Link(label="L", results=[LossResult(fibre=1, wavelength_nm=1310.0, loss_db=loss)])],
    )
    cell = _rows(job, style)[0]["loss_db"]
    assert not cell.startswith("'")  # never neutralised into text
    decimal = "," if style == "semicolon" else "."
    assert "." not in cell if style == "semicolon" else "," not in cell
    value = float(cell.replace(decimal, "."))
    assert abs(value - loss) <= 0.005 + 1e-9  # to 0.01 dB, the meter's resolution


@settings(max_examples=300, deadline=None)
@given(
    text=st.text(min_size=1, max_size=40).filter(lambda t: t.strip() != ""),
    style=st.sampled_from(sorted(STYLES)),
)
def test_user_text_never_starts_a_formula(text: str, style: str) -> None:
    job = Job(
        name=text,
        links=[
            Link(
                label="L", results=[LossResult(fibre=1, wavelength_nm=1310.0, loss_db=1.0, by=text)]
            )
        ],
    )
    row = _rows(job, style)[0]
    for cell in (row["job"], row["by"]):
        if cell[:1] in ("=", "+", "-", "@"):
            assert PLAIN_NUMBER.fullmatch(cell), cell  # only a plain number may start so
        assert "\t" not in cell and "\r" not in cell
