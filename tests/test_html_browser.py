"""The HTML report in a real headless browser: its images render, the page is not blank, and
nothing is requested from the network. Requirements are the project's own (offline report;
no published source). Skips without Chromium, except in CI (the CI variable set), where a
missing browser fails.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

pytestmark = pytest.mark.endtoend

FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync")


def _chromium() -> str:
    path = shutil.which("chromium") or ("/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None)
    if path is None:
        if os.environ.get("CI"):
            pytest.fail("Chromium is required in CI for the HTML report test (apt-get install chromium)")
        pytest.skip("Chromium not installed")
    return path


def _run(tmp: Path, url: str, *extra: str) -> subprocess.CompletedProcess:
    profile = tmp / f"profile-{len(list(tmp.glob('profile-*')))}"
    profile.mkdir()
    return subprocess.run([_chromium(), *FLAGS, f"--user-data-dir={profile}", *extra, url],
                          capture_output=True, text=True, timeout=120)


@pytest.fixture(scope="module")
def page(tmp_path_factory):
    """An HTML report of a real command: a batch extraction (table, a plot of several units)."""
    from cmcheck.cli import main

    _chromium()
    tmp = tmp_path_factory.mktemp("browser")
    f = np.geomspace(1e6, 50e6, 81)
    for unit, r in (("unit-01", 900.0), ("unit-02", 1200.0)):
        w = 2 * np.pi * f
        z = 1 / (1 / r + 1 / (1j * w * 20e-6) + 1j * w * 2e-12)
        s21 = 100 / (100 + z)
        # S11 = 1 − S21 of a series impedance (Pozar, Microwave Engineering, 4th ed., Table 4.2).
        lines = ["# Hz S RI R 50"] + [f"{fi:.6g} {(1 - s).real:.9g} {(1 - s).imag:.9g} {s.real:.9g} {s.imag:.9g} "
                                      f"{s.real:.9g} {s.imag:.9g} {(1 - s).real:.9g} {(1 - s).imag:.9g}"
                                      for fi, s in zip(f, s21)]
        (tmp / f"{unit}.s2p").write_text("\n".join(lines) + "\n")
    out = tmp / "report.html"
    cwd = os.getcwd()
    os.chdir(tmp)
    try:
        assert main(["extract", "unit-01.s2p", "unit-02.s2p", "--band", "1.8-30MHz", "--html", str(out)]) in (0, 1)
    finally:
        os.chdir(cwd)
    return tmp, out


def test_screenshot_is_not_blank(page):
    from matplotlib.image import imread

    tmp, html = page
    shot = tmp / "shot.png"
    _run(tmp, html.as_uri(), f"--screenshot={shot}", "--window-size=1000,1400", "--hide-scrollbars")
    pixels = imread(shot)[..., :3]
    assert pixels.shape[0] >= 1000
    # A blank page is one colour; text, tables and a plot spread the pixel values.
    assert pixels.std() > 0.05 and (pixels < 0.5).mean() > 0.002


_PROBE = """<script>
window.addEventListener('load', function () {
  var out = [];
  document.querySelectorAll('img').forEach(function (im) {
    // Decoded pixels, not only the header's size: count the dark ones (lines, text).
    var c = document.createElement('canvas');
    c.width = im.naturalWidth; c.height = im.naturalHeight;
    var g = c.getContext('2d');
    g.drawImage(im, 0, 0);
    var d = g.getImageData(0, 0, c.width || 1, c.height || 1).data, dark = 0;
    for (var i = 0; i < d.length; i += 4) { if (d[i + 3] > 0 && d[i] + d[i + 1] + d[i + 2] < 384) dark++; }
    out.push([im.complete, im.naturalWidth, im.naturalHeight, dark / (d.length / 4)]);
  });
  var pre = document.createElement('pre');
  pre.id = 'probe';
  pre.textContent = JSON.stringify(out);
  document.body.appendChild(pre);
});
</script>"""


def test_every_image_renders(page):
    tmp, html = page
    text = html.read_text(encoding="utf-8")
    n_img = text.count("<img ")
    assert n_img >= 1
    # A copy with a probe script (the report itself allows none): the images are the report's.
    probe = tmp / "probe.html"
    probe.write_text(re.sub(r"default-src 'none';", "default-src 'none'; script-src 'unsafe-inline';", text)
                     .replace("</body>", _PROBE + "</body>"), encoding="utf-8")
    dom = _run(tmp, probe.as_uri(), "--dump-dom", "--virtual-time-budget=5000").stdout
    found = re.search(r'<pre id="probe">(.*?)</pre>', dom)
    assert found, dom[-500:]
    images = json.loads(found.group(1))
    assert len(images) == n_img
    for complete, width, height, dark in images:
        assert complete and width > 300 and height > 200
        assert dark > 0.005, "an image decoded blank"


def _page_requests(netlog: Path) -> list[str]:
    """URLs the page asked for (not the browser's own background traffic), from a net log."""
    data = json.loads(netlog.read_text())
    start = data["constants"]["logEventTypes"]["URL_REQUEST_START_JOB"]
    urls = []
    for e in data["events"]:
        p = e.get("params", {})
        if e["type"] == start and "url" in p and p.get("initiator") != "not an origin":
            urls.append(p["url"])
    return [u for u in urls if not u.startswith(("file:", "data:"))]


def test_no_request_leaves_the_file(page):
    tmp, html = page
    text = html.read_text(encoding="utf-8")
    assert "default-src 'none'; img-src data:; style-src 'unsafe-inline'" in text
    log = tmp / "net.json"
    _run(tmp, html.as_uri(), "--dump-dom", "--virtual-time-budget=3000", f"--log-net-log={log}")
    assert _page_requests(log) == []
    # The detector sees a page's request (negative control): an external image, no policy.
    leaky = tmp / "leaky.html"
    leaky.write_text('<html><body><img src="http://127.0.0.1:9/x.png"></body></html>')
    log2 = tmp / "net2.json"
    _run(tmp, leaky.as_uri(), "--dump-dom", "--virtual-time-budget=3000", f"--log-net-log={log2}")
    assert _page_requests(log2) == ["http://127.0.0.1:9/x.png"]
