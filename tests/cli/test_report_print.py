"""The demo job's report printed by a real browser engine: headless Chromium (Debian package
``chromium``) prints it to PDF, one page per link, each with the header, the verdict, the chart,
the equipment and the signature block. Skipped where Chromium is not installed; the per-page
text check needs ``pdftotext`` (Debian ``poppler-utils``) and is skipped without it.
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

from fieldkit.actions.export import export_job
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.settings import add_equipment, make_equipment, set_report_text

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="headless Chromium is not installed")


def _chromium(*args: str) -> None:
    assert CHROMIUM is not None
    subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", *args],
        check=True,
        capture_output=True,
        timeout=180,
    )


@pytest.fixture
def printed(isolated_dirs: dict[str, Path], tmp_path: Path) -> tuple[Path, Path]:
    store = JobStore(isolated_dirs["data"] / "jobs")
    backbone = build(local_day_start(now()))[0]  # the demo's "Library to Town Hall backbone"
    store.save(backbone)
    config = isolated_dirs["config"]
    set_report_text(config, "contractor", "Northline Fibre Works")
    set_report_text(config, "crew", "Test crew 2")
    add_equipment(config, make_equipment("meter", "PM-4", "2026-01-10", "2030-01-10"))
    add_equipment(config, make_equipment("source", "SRC-2", "2025-11-02"))
    out = tmp_path / "out"
    out.mkdir()
    html = export_job(store, backbone.id, "html", f"{out}/", config=config).path
    assert html is not None
    pdf = out / "report.pdf"
    _chromium("--no-pdf-header-footer", f"--print-to-pdf={pdf}", html.as_uri())
    return html, pdf


def _pages(pdf: Path) -> int:
    return len(re.findall(rb"/Type\s*/Page(?!s)", pdf.read_bytes()))


def test_the_demo_report_prints_one_page_per_link(printed: tuple[Path, Path]) -> None:
    html, pdf = printed
    assert pdf.stat().st_size > 10_000
    # the summary page, the one link's page, then the appendix (A and B)
    assert _pages(pdf) >= 3
    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext (poppler-utils) is not installed: page text not checked")
    text = subprocess.run(
        ["pdftotext", "-layout", str(pdf), "-"], check=True, capture_output=True, text=True
    ).stdout
    pages = text.split("\f")
    link_pages = [p for p in pages if "Link LIB-TH-01" in p and "Link LIB-TH-01: FAIL" in p]
    assert len(link_pages) == 1
    page = link_pages[0]
    # header, verdict, chart (its SVG title is text), results, equipment, signature: one page
    for words in (
        "Northline Fibre Works",
        "Link LIB-TH-01: FAIL",
        "loss per fibre at 1310 nm",
        "loss per fibre at 1550 nm",
        "Test equipment: power meter PM-4",
        "Customer",
        "Signature",
    ):
        assert words in page, words
    summary = pages[0]
    for words in ("Job verdict", "Test equipment", "Legend", "Signature"):
        assert words in summary, words


def test_a_screenshot_of_the_report_is_drawn(printed: tuple[Path, Path], tmp_path: Path) -> None:
    html, _ = printed
    png = tmp_path / "report.png"
    _chromium(f"--screenshot={png}", "--window-size=900,1400", html.as_uri())
    data = png.read_bytes()
    assert data.startswith(b"\x89PNG") and len(data) > 20_000
