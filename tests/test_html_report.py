"""The HTML report: inert with hostile names, offline, and showing the console's numbers.

Requirements are the project's own (offline, escaped report; one formatter; no published source).
"""

from __future__ import annotations

import json
import re
from html.parser import HTMLParser

import numpy as np
import pytest

from cmcheck.curve import series_s21
from cmcheck.model.materials import get_material
from cmcheck.reporting.html import CSP

HOSTILE_TOUCHSTONE = "<img src=x onerror=alert(1)>.s2p"  # a file name without a slash
HOSTILE_MATERIAL = "<script>alert(1)"  # file names cannot hold the closing tag's slash
HOSTILE_COMMENT = "<script>alert(1)</script>"


class _Page(HTMLParser):
    """Tags with their attributes, the text, and the cells of every table."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict]] = []
        self.text: list[str] = []
        self.tables: list[list[list[str]]] = []
        self._cell: list[str] | None = None
        self._body = False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        if tag == "table":
            self.tables.append([])
        elif tag == "tbody":
            self._body = True
        elif tag == "tr" and self._body:
            self.tables[-1].append([])
        elif tag == "td":
            self._cell = []

    def handle_endtag(self, tag):
        if tag == "td" and self._cell is not None:
            self.tables[-1][-1].append("".join(self._cell))
            self._cell = None
        elif tag == "tbody":
            self._body = False

    def handle_data(self, data):
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)


def _parse(path) -> _Page:
    p = _Page()
    p.feed(path.read_text(encoding="utf-8"))
    return p


def _assert_inert(page: _Page) -> None:
    names = [t for t, _ in page.tags]
    assert "script" not in names and "iframe" not in names and "object" not in names and "link" not in names
    for tag, attrs in page.tags:
        assert not any(k.startswith("on") for k in attrs), (tag, attrs)
        for k in ("src", "href", "action", "srcset"):
            if k in attrs:
                assert attrs[k].startswith("data:image/png;base64,"), (tag, k, attrs[k][:40])
    metas = [a for t, a in page.tags if t == "meta" and a.get("http-equiv") == "Content-Security-Policy"]
    assert metas and metas[0]["content"] == CSP and "default-src 'none'" in CSP


def _hostile_s2p(path) -> None:
    f = np.geomspace(1e6, 50e6, 41)
    w = 2 * np.pi * f
    z = 1 / (1 / 1500 + 1 / (1j * w * 20e-6) + 1j * w * 2e-12)
    s21 = series_s21(z)  # Pozar, Microwave Engineering, 4th ed., Table 4.2
    s11 = 1 - s21
    rows = [f"{fi:.6g} {a.real:.9g} {a.imag:.9g} {b.real:.9g} {b.imag:.9g} {b.real:.9g} {b.imag:.9g} "
            f"{a.real:.9g} {a.imag:.9g}" for fi, a, b in zip(f, s11, s21)]
    path.write_text("# Hz S RI R 50\n" + "\n".join(rows) + "\n")


def test_hostile_touchstone_name_stays_text(run_cli, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    _hostile_s2p(tmp_path / HOSTILE_TOUCHSTONE)
    out = tmp_path / "r.html"
    code, _, err = run_cli("extract", HOSTILE_TOUCHSTONE, "--band", "1.8-30MHz", "--html", out)
    assert code == 0, err
    page = _parse(out)
    _assert_inert(page)
    assert HOSTILE_TOUCHSTONE in "".join(page.text)  # shown, as text
    assert "<img src=x" not in out.read_text(encoding="utf-8")


def test_hostile_material_name_stays_text(run_cli, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    m = get_material("nizn-800")
    f = np.geomspace(1e5, 3e8, 40)
    mu = m.permeability(f)
    name = f"{HOSTILE_MATERIAL}.csv"
    (tmp_path / name).write_text(f"# {HOSTILE_COMMENT}\nfrequency_hz,mu_prime,mu_double_prime\n"
                                 + "".join(f"{a:.6g},{b.real:.6g},{-b.imag:.6g}\n" for a, b in zip(f, mu)))
    out = tmp_path / "c.html"
    code, stdout, err = run_cli("compare", "--materials", f"nizn-800,{name}", "--od", "61mm", "--id", "35.6mm",
                                "--height", "12.7mm", "--turns", "8", "--cable-od", "5mm", "--band", "3.5-30MHz",
                                "--html", out)
    assert code == 0, err
    page = _parse(out)
    _assert_inert(page)
    assert HOSTILE_MATERIAL in "".join(page.text)


def _cells_in_console(row: list[str], console: str) -> bool:
    """Some console line shows the row's cells in order."""
    for line in console.splitlines():
        at = 0
        for cell in row:
            at = line.find(cell, at)
            if at < 0:
                break
            at += len(cell)
        else:
            return True
    return False


def test_report_tables_are_the_console_tables(run_cli, tmp_path):
    out, j = tmp_path / "c.html", tmp_path / "c.json"
    code, stdout, err = run_cli("compare", "--materials", "nizn-800,mnzn-1500,nizn-250", "--od", "61mm",
                                "--id", "35.55mm", "--height", "12.7mm", "--turns", "8", "--cable-od", "5mm",
                                "--band", "3.5-30MHz", "--html", out, "--json", j)
    assert code == 0, err
    page = _parse(out)
    assert len(page.tables) == 2
    for table in page.tables:
        assert table
        for row in table:
            assert _cells_in_console(row, stdout), row
    # The numbers are the result's: the ranking's min R is the JSON's, rounded as shown.
    data = json.loads(j.read_text())
    by_name = {s["name"]: s for s in data["materials"]}
    for row in page.tables[0]:
        shown = float(row[2].replace(",", ""))
        decimals = len(row[2].split(".")[1]) if "." in row[2] else 0
        assert shown == pytest.approx(by_name[row[1]]["min_resistance_ohm"], abs=0.5 * 10 ** -decimals + 1e-9)


def test_report_has_inputs_version_plot_and_cautions(run_cli, tmp_path):
    from cmcheck import __version__
    from cmcheck.reporting.files import SAFETY_NOTES

    out = tmp_path / "p.html"
    code, _, err = run_cli("predict", "--material", "nizn-800", "--od", "61mm", "--id", "35.6mm", "--height", "12.7mm",
                           "--turns", "8", "--cable-od", "5mm", "--band", "1.8-30MHz", "--html", out)
    assert code == 0, err
    text = out.read_text(encoding="utf-8")
    page = _parse(out)
    words = " ".join(page.text)
    assert f"cmcheck {__version__}" in words and "1.8 MHz–30 MHz" in words
    assert SAFETY_NOTES[0] in words
    imgs = [a for t, a in page.tags if t == "img"]
    assert len(imgs) == 1 and len(imgs[0]["src"]) > 10_000
    assert not re.search(r"https?://", text)


def test_html_output_refuses_to_overwrite_an_input(run_cli, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    _hostile_s2p(tmp_path / "a.s2p")
    code, _, err = run_cli("extract", "a.s2p", "--html", "a.s2p")
    assert code == 2 and "overwrite an input" in err
