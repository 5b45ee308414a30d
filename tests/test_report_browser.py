"""A study's report.html as a reader sees it: opened in a real browser when one is here.

The report of a small study (tables, a records plot, a graph plot), written
once with PNG figures (the default) and once with SVG figures shown and PDF
files linked (``[report] figures``), is checked in two ways:

- always, strictly as HTML (every element closed in order, tables with
  header cells, every image with alternative text), and every image it
  shows is a file beside it that is a valid PNG (signature, ``IHDR`` with
  a non-zero size, ``IEND``) or SVG (well-formed XML with an ``<svg>`` root);
- when a Chromium or Chrome binary is on ``PATH`` (``apt-get install
  chromium`` on Debian), the page is opened headless (``--dump-dom``) with a
  small script added that writes into the page whether every ``<img>``
  loaded (``complete`` and ``naturalWidth > 0``) and which text of the page
  the browser does not render (``innerText``). With Firefox (also tried
  when present) the same script paints the page green or red and a headless
  screenshot is read.

No browser here is no reason to pass less: the HTML checks run either way.
"""

from __future__ import annotations

import html
import json
import os
import re
import shutil
import struct
import subprocess
import xml.etree.ElementTree as ET
import zlib
from html.parser import HTMLParser
from pathlib import Path

import pytest

from cyclewright.cli.study import run_study
from cyclewright.cli.studyfile import load_study

_STUDY = """
[study]
title = "Report in a browser"
description = "Records and a functional graph of two maps, with their plots."

[maps]
use = ["3x+1", "3x+5"]

[[analysis]]
kind = "records"
to = 3000
maps = ["3x+1"]

[[analysis]]
kind = "graph"
to = 40
maps = ["3x+5"]
"""

CHROMES = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable", "chrome")


# the report as the study writes it by default (PNG figures), and with SVG figures shown
# and PDF files linked (the study file's [report] table)
FORMATS = {
    "png": ("", ("png",)),
    "svg": ('[report]\nfigures = ["svg", "pdf"]\n', ("svg", "pdf")),
}


@pytest.fixture(scope="module", params=sorted(FORMATS))
def report(tmp_path_factory, request) -> tuple[str, Path]:
    out = tmp_path_factory.mktemp(f"browser-{request.param}") / "out"
    env = {
        k: str(out.parent / k.lower()) for k in ("CYCLEWRIGHT_DATA_DIR", "CYCLEWRIGHT_CACHE_DIR")
    }
    saved = {k: os.environ.get(k) for k in env}
    os.environ.update(env)
    try:
        src = out.parent / "browser.toml"
        src.write_text(_STUDY.replace("[maps]", FORMATS[request.param][0] + "\n[maps]", 1))
        run_study(load_study(src), out, workers=1)
    finally:
        for k, v in saved.items():
            if v is None:
                os.environ.pop(k, None)
            else:
                os.environ[k] = v
    return request.param, out


# ------------------------------------------------------------------ strict HTML
class _Page(HTMLParser):
    """Well-formedness (W3C HTML: elements nest and close), images, tables and visible text."""

    VOID = {"meta", "img", "br", "hr", "link", "input", "col", "source", "wbr"}
    HIDDEN = {"script", "style", "title", "head"}

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.images: list[dict] = []
        self.links: list[str] = []
        self.tables: list[dict] = []
        self.texts: list[str] = []
        self.problems: list[str] = []
        self.doctype = False

    def handle_decl(self, decl):
        self.doctype = self.doctype or decl.lower() == "doctype html"

    def handle_starttag(self, tag, attrs):
        if tag == "img":
            self.images.append(dict(attrs))
        if tag == "a" and dict(attrs).get("href"):
            self.links.append(dict(attrs)["href"])
        if tag in self.VOID:
            return
        self.stack.append(tag)
        if tag == "table":
            self.tables.append({"th": 0, "rows": []})
        elif tag == "tr" and self.tables:
            self.tables[-1]["rows"].append(0)
        elif tag in ("td", "th") and self.tables and self.tables[-1]["rows"]:
            self.tables[-1]["rows"][-1] += 1
            self.tables[-1]["th"] += tag == "th"

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)

    def handle_endtag(self, tag):
        if tag in self.VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.problems.append(f"</{tag}> closes {self.stack[-3:]}")
            return
        self.stack.pop()

    def handle_data(self, data):
        if not self.HIDDEN & set(self.stack) and data.strip():
            self.texts.append(" ".join(data.split()))


def _parse(page: str) -> _Page:
    p = _Page()
    p.feed(page)
    p.close()
    return p


def _png_ok(data: bytes) -> bool:
    """PNG (ISO/IEC 15948): signature, an IHDR chunk first with its CRC and a non-zero size, IEND last."""
    if data[:8] != b"\x89PNG\r\n\x1a\n" or len(data) < 45:
        return False
    length, kind = struct.unpack(">I4s", data[8:16])
    body = data[16 : 16 + length]
    (crc,) = struct.unpack(">I", data[16 + length : 20 + length])
    width, height = struct.unpack(">II", body[:8])
    return (
        kind == b"IHDR"
        and length == 13
        and zlib.crc32(kind + body) == crc
        and width > 0
        and height > 0
        and data[-12:] == b"\x00\x00\x00\x00IEND\xaeB`\x82"
    )


def _svg_ok(data: bytes) -> bool:
    """SVG (W3C SVG 1.1): well-formed XML whose root is ``svg`` in the SVG namespace."""
    try:
        root = ET.fromstring(data)
    except ET.ParseError:
        return False
    return root.tag == "{http://www.w3.org/2000/svg}svg"


def _image_ok(path: Path) -> bool:
    data = path.read_bytes()
    kind = path.suffix.lower()
    if kind == ".pdf":  # ISO 32000: header, end-of-file marker
        return data.startswith(b"%PDF-") and b"%%EOF" in data[-1024:]
    return _png_ok(data) if kind == ".png" else _svg_ok(data)


def test_png_and_svg_checks_tell_good_from_bad(tmp_path):
    # PNG signature and chunk layout: ISO/IEC 15948; SVG root: W3C SVG 1.1
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(1, 1))
    ax.plot([0, 1], [0, 1])
    for ext in ("png", "svg"):
        fig.savefig(tmp_path / f"a.{ext}")
    plt.close(fig)
    assert _image_ok(tmp_path / "a.png") and _image_ok(tmp_path / "a.svg")
    good = (tmp_path / "a.png").read_bytes()
    (tmp_path / "cut.png").write_bytes(good[: len(good) // 2])
    (tmp_path / "crc.png").write_bytes(good[:29] + bytes([good[29] ^ 1]) + good[30:])
    (tmp_path / "b.svg").write_text("<html><body>not svg</body></html>")
    (tmp_path / "c.svg").write_text("<svg xmlns='http://www.w3.org/2000/svg'>")
    for bad in ("cut.png", "crc.png", "b.svg", "c.svg"):
        assert not _image_ok(tmp_path / bad), bad


# ------------------------------------------------------------------ a real browser
_PROBE = """
<script>
window.addEventListener("load", function () {
  var imgs = Array.prototype.slice.call(document.images);
  var broken = imgs.filter(function (i) { return !(i.complete && i.naturalWidth > 0); })
                   .map(function (i) { return i.getAttribute("src"); });
  var shown = (document.body.innerText || "").replace(/\\s+/g, " ");
  var expected = %s;
  var missing = expected.filter(function (t) { return shown.indexOf(t) < 0; });
  var out = {images: imgs.length, broken: broken, missing: missing,
             widths: imgs.map(function (i) { return i.naturalWidth; })};
  var ok = imgs.length > 0 && broken.length === 0 && missing.length === 0;
  var pre = document.createElement("pre");
  pre.id = "cw-probe";
  pre.textContent = JSON.stringify(out);
  document.body.appendChild(pre);
  document.documentElement.style.background = ok ? "#00ff00" : "#ff0000";
  document.body.style.visibility = "hidden";
});
</script>
"""


def _browsers() -> list[tuple[str, str]]:
    """The browsers on PATH: the first of the Chromium family, and Firefox."""
    found = []
    for name in CHROMES:
        if shutil.which(name):
            found.append(("chrome", shutil.which(name)))
            break
    for name in ("firefox", "firefox-esr"):
        if shutil.which(name):
            found.append(("firefox", shutil.which(name)))
            break
    return found


def _probe_page(report: Path, expected: list[str]) -> Path:
    page = (report / "report.html").read_text()
    probe = _PROBE % json.dumps(expected)
    copy = report / "report-probe.html"  # beside the report: the same relative image paths
    copy.write_text(page.replace("</body>", probe + "</body>", 1))
    return copy


def _run_chrome(binary: str, page: Path, profile: Path) -> dict:
    cmd = [
        binary,
        "--headless",
        "--disable-gpu",
        "--no-sandbox",
        "--no-first-run",
        "--disable-dev-shm-usage",
        "--allow-file-access-from-files",
        f"--user-data-dir={profile}",
        "--virtual-time-budget=10000",
        "--dump-dom",
        page.as_uri(),
    ]
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=180)
    assert done.returncode == 0, done.stderr[-2000:]
    found = re.search(r'<pre id="cw-probe">(.*?)</pre>', done.stdout, re.S)
    assert found, f"the probe did not run: {done.stdout[-500:]} {done.stderr[-1000:]}"
    return json.loads(html.unescape(found.group(1)))


def _run_firefox(binary: str, page: Path, profile: Path) -> dict:
    """Firefox cannot dump the DOM: the probe paints the page green (all well) or red."""
    shot = profile / "shot.png"
    profile.mkdir(parents=True, exist_ok=True)
    cmd = [binary, "--headless", "--profile", str(profile), "--screenshot", str(shot)]
    done = subprocess.run([*cmd, page.as_uri()], capture_output=True, text=True, timeout=180)
    assert done.returncode == 0 and shot.is_file(), done.stderr[-2000:]
    import matplotlib.image as mpimg

    pixel = mpimg.imread(shot)[5, 5][:3]
    green = pixel[1] > 0.9 and pixel[0] < 0.1
    return {"images": None, "broken": [] if green else ["?"], "missing": [] if green else ["?"]}


def test_report_renders_with_every_image(report, tmp_path):
    fmt, report = report
    # W3C HTML (well-formed, images with alt text); PNG: ISO/IEC 15948; SVG: W3C SVG 1.1
    page = (report / "report.html").read_text()
    p = _parse(page)
    assert p.doctype and not p.problems and not p.stack, (p.problems, p.stack)
    assert len(p.tables) >= 3
    for t in p.tables:
        assert t["th"] >= 1 and len(set(t["rows"])) == 1, t
    assert len(p.images) == 2, p.images  # the records plot and the graph plot
    for img in p.images:
        assert img.get("alt"), "a figure without alternative text"
        src = img.get("src", "")
        assert src and "://" not in src and not src.startswith("/"), src  # beside the report
        assert _image_ok(report / src), src
    # the figure files linked beside each figure (every format) are there and valid
    # (and every other file the page links to: the tables' CSV, JSON and LaTeX)
    local = [h for h in p.links if "://" not in h and not h.startswith("#")]
    assert local and all((report / h).is_file() for h in local), local
    figures = [h for h in local if Path(h).suffix in (".png", ".svg", ".pdf")]
    assert len(figures) == 2 * len(FORMATS[fmt][1]), figures
    assert all(_image_ok(report / h) for h in figures), figures
    assert {Path(i["src"]).suffix for i in p.images} == {f".{fmt}"}
    assert "Caution" in page and "heuristic" in page

    # with no browser on this machine the checks above are the test; else each one found
    # must show every image and render every piece of text the page holds
    expected = sorted({t for t in p.texts if len(t) > 1})
    assert len(expected) > 50
    probe = _probe_page(report, expected)
    for kind, binary in _browsers():
        run = _run_chrome if kind == "chrome" else _run_firefox
        result = run(binary, probe, tmp_path / f"profile-{kind}")
        assert result["broken"] == [], f"images not shown by {binary}: {result['broken']}"
        assert result["missing"] == [], f"text not rendered by {binary}: {result['missing'][:10]}"
        if result["images"] is not None:
            assert result["images"] == len(p.images)
            assert all(w > 100 for w in result["widths"]), result["widths"]


def test_the_probe_sees_a_broken_image(report, tmp_path):
    report = report[1]
    # common practice, no source: a check that cannot fail proves nothing; a missing
    # image file must be caught (by the browser when there is one, else by the file check)
    broken = tmp_path / "broken"
    shutil.copytree(report, broken, ignore=shutil.ignore_patterns("stores"))
    page = _parse((broken / "report.html").read_text())
    gone = page.images[0]["src"]
    (broken / gone).unlink()
    assert not all((broken / i["src"]).is_file() for i in page.images)
    probe = _probe_page(broken, ["Report in a browser", "a sentence the report does not hold"])
    for kind, binary in _browsers():
        run = _run_chrome if kind == "chrome" else _run_firefox
        result = run(binary, probe, tmp_path / f"profile-{kind}")
        assert result["broken"] and result["missing"], binary
        if kind == "chrome":
            assert result["broken"] == [gone]
            assert result["missing"] == ["a sentence the report does not hold"]
