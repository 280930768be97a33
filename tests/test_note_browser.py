"""The design note in a real browser: headless Chromium prints it, screenshots it, renders its DOM.

Skipped when no Chromium is installed (CI installs the Debian package `chromium`).
"""

from __future__ import annotations

import re
import shutil
import subprocess
from pathlib import Path

import pytest

from pullproof.report.note import write_note
from pullproof.results import ReviewResult
from resultfactory import sample_result

CHROMIUM = next((p for p in map(shutil.which, ("chromium", "chromium-browser")) if p), None)
pytestmark = pytest.mark.skipif(
    CHROMIUM is None, reason="headless Chromium is not installed (Debian package 'chromium')"
)
TIMEOUT = 120  # seconds; a first start of Chromium in a fresh profile can be slow


def chromium(tmp_path: Path, *args: str) -> subprocess.CompletedProcess[bytes]:
    assert CHROMIUM is not None
    profile = tmp_path / "profile"
    cmd = [
        CHROMIUM,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        f"--user-data-dir={profile}",
        *args,
    ]
    done = subprocess.run(cmd, capture_output=True, timeout=TIMEOUT, check=False)
    assert done.returncode == 0, done.stderr.decode(errors="replace")[-2000:]
    return done


def note_file(tmp_path: Path, result: ReviewResult, name: str) -> Path:
    path = tmp_path / f"{name}.html"
    write_note(result, path, title="Greenhouse controller", author="Tester", date="2025-03-01")
    return path


def pdf_pages(tmp_path: Path, html: Path) -> int:
    pdf = html.with_suffix(".pdf")
    chromium(tmp_path, f"--print-to-pdf={pdf}", "--no-pdf-header-footer", html.as_uri())
    data = pdf.read_bytes()
    assert data.startswith(b"%PDF")
    if shutil.which("pdfinfo"):
        info = subprocess.run(
            ["pdfinfo", str(pdf)], capture_output=True, text=True, timeout=30, check=True
        ).stdout
        m = re.search(r"^Pages:\s+(\d+)", info, re.M)
        assert m, info
        return int(m.group(1))
    return len(re.findall(rb"/Type\s*/Page(?!s)", data))


def test_pdf_grows_with_the_number_of_networks(tmp_path: Path) -> None:
    one = pdf_pages(tmp_path, note_file(tmp_path, sample_result(1), "one"))
    four = pdf_pages(tmp_path, note_file(tmp_path, sample_result(4), "four"))
    # Each network section starts on a new page (break-before: page).
    assert one >= 2
    assert four >= one + 3


def test_rendered_dom_has_every_chart(tmp_path: Path) -> None:
    result = sample_result()
    html = note_file(tmp_path, result, "dom")
    dom = chromium(tmp_path, "--dump-dom", html.as_uri()).stdout.decode()
    assert dom.count('<svg xmlns="http://www.w3.org/2000/svg" class="chart" role="img"') == len(
        result.networks
    )
    assert dom.count('class="network"') == len(result.networks)
    assert "<script" not in dom
    # the operating-point table: one per network, a fitted row, then one row per candidate
    with_op = [nr for nr in result.networks if nr.operating is not None]
    assert dom.count('<table class="oppoint">') == len(with_op)
    assert dom.count('class="op-row fitted"') == len(with_op)
    candidates = sum(len(nr.recommendation.points) for nr in with_op if nr.recommendation)
    assert dom.count('class="op-row') == len(with_op) + candidates


def test_screenshot_is_written(tmp_path: Path) -> None:
    html = note_file(tmp_path, sample_result(), "shot")
    png = tmp_path / "shot.png"
    chromium(tmp_path, f"--screenshot={png}", "--window-size=1200,1600", html.as_uri())
    data = png.read_bytes()
    assert data.startswith(b"\x89PNG\r\n\x1a\n")
    # PNG IHDR (ISO/IEC 15948): width and height are the big-endian words at bytes 16-24.
    assert int.from_bytes(data[16:20], "big") == 1200
    assert int.from_bytes(data[20:24], "big") == 1600


def test_demo_note_prints_one_page_or_more_per_network(tmp_path: Path) -> None:
    from pullproof.demo import write_demo

    demo = write_demo(tmp_path / "demo")
    networks = len(demo.result.networks)
    pages = pdf_pages(tmp_path, demo.note)
    # The summary comes first and every network section starts on a new page.
    assert pages >= networks + 1
    dom = chromium(tmp_path, "--dump-dom", demo.note.as_uri()).stdout.decode()
    assert dom.count('class="chart" role="img"') == networks
    assert dom.count('<table class="oppoint">') == networks
    if shutil.which("pdftotext"):  # the printed note carries every operating-point table
        pdf = demo.note.with_suffix(".pdf")
        text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True,
                              timeout=30, check=True).stdout  # fmt: skip
        assert text.count("Operating point") == networks
        assert "fitted R22" in text and "E24 pick" in text
    png = tmp_path / "demo.png"
    chromium(tmp_path, f"--screenshot={png}", "--window-size=1000,1400", demo.note.as_uri())
    assert png.read_bytes().startswith(b"\x89PNG\r\n\x1a\n")
