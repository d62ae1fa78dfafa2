"""HTML reports are self-contained: every figure embedded, nothing fetched from outside."""

from __future__ import annotations

import re
import shutil
import subprocess
from html.parser import HTMLParser
from pathlib import Path

import networkx as nx
import pytest

from graphinv.report.html import (
    Section,
    collection_report,
    graph_report,
    is_sqlite_file,
    render_html,
    store_report,
    write_report,
)


class _Links(HTMLParser):
    """Collects every URL-bearing attribute, every tag name and the img count."""

    def __init__(self) -> None:
        super().__init__()
        self.urls: list[str] = []
        self.tags: set[str] = set()
        self.images = 0

    def handle_starttag(self, tag, attrs):
        self.tags.add(tag)
        if tag == "img":
            self.images += 1
        for name, value in attrs:
            if name in {"src", "href", "srcset", "action", "data", "poster", "xlink:href"}:
                self.urls.append(value or "")


def assert_self_contained(page: str) -> _Links:
    parser = _Links()
    parser.feed(page)
    outside = [u for u in parser.urls if not (u.startswith("data:") or u.startswith("#"))]
    assert outside == [], f"links outside the file: {outside[:3]}"
    assert "script" not in parser.tags and "link" not in parser.tags and "iframe" not in parser.tags
    css_urls = re.findall(r"url\(([^)]*)\)", page)
    assert all(u.strip("'\" ").startswith(("data:", "#")) for u in css_urls)
    assert "http://" not in page and "https://" not in page
    return parser


def test_graph_report_embeds_its_figure():
    page = graph_report(nx.petersen_graph(), name="Petersen")
    parser = assert_self_contained(page)
    # the drawing, and the identity with the four generators (one per invariant factor)
    assert parser.images == page.count('src="data:image/png;base64,') == 2
    assert "Identity and group generators" in page
    assert "Z/2 ⊕ (Z/10)^3" in page  # Petersen: Z2 ⊕ Z10^3 (common fact, memory)
    assert "2000" in page


def test_collection_report_embeds_every_figure():
    # Two Laplacian-cospectral 6-vertex graphs (found by exhaustive search of the networkx
    # atlas; 4 graphs on 6 vertices have an L-cospectral mate, Haemers & Spence 2004, Table 1),
    # plus cycles so that sizes vary.
    a = nx.Graph([(0, 2), (1, 2), (1, 3), (1, 4), (2, 5), (3, 5), (4, 5)])
    b = nx.Graph([(0, 2), (0, 5), (1, 3), (1, 4), (2, 3), (3, 4), (3, 5)])
    a.graph["name"], b.graph["name"] = "A", "B"
    graphs = [a, b, nx.cycle_graph(5), nx.cycle_graph(7)]
    page = collection_report(graphs, title="mixed")
    parser = assert_self_contained(page)
    # rank distribution, growth, cospectral separation
    assert parser.images == page.count('src="data:image/png;base64,') == 3
    assert "A, B" in page  # the class is listed by name


def test_store_report(tmp_path):
    from graphinv.batch.engine import run_batch

    path = tmp_path / "wheels.db"
    run_batch(["wheel:3..8"], store=str(path), workers=1)
    assert is_sqlite_file(path)
    page = store_report(path)
    parser = assert_self_contained(page)
    assert parser.images == 1
    # W8 has 2205 spanning trees (OEIS A004146), the most of W3..W8, so it heads the table of
    # largest groups.
    assert "2205" in page
    assert "Wood 2017" not in page  # wheels are not random graphs: no limiting law drawn


def test_store_of_random_graphs_shows_the_limiting_law(tmp_path):
    from graphinv.batch.engine import run_batch

    path = tmp_path / "random.db"
    run_batch(["gnp:10,1/2,seed=1..40"], store=str(path), workers=1)
    page = store_report(path)
    assert_self_contained(page)
    assert "0.79352" in page  # ∏ ζ(2k+1)^-1 (Clancy et al. 2015; Wood 2017)


def test_text_is_escaped():
    page = render_html("<b>x</b>", [Section("a & b", paragraphs=("<script>alert(1)</script>",))])
    assert "<script>" not in page and "&lt;script&gt;" in page and "&lt;b&gt;x&lt;/b&gt;" in page


def test_write_report_dispatch(tmp_path):
    one = write_report("wheel:5", output=tmp_path / "one.html")
    many = write_report("cycle:3..6", output=tmp_path / "sub" / "many.html")
    assert (one.kind, one.graphs) == ("graph", 1)
    assert (many.kind, many.graphs) == ("collection", 4)
    grids = write_report("grid:2..6", output=tmp_path / "grids.html")
    # Square grids: the report quotes Temperley's limit exp(4G/π) ≈ 3.209912 (Temperley 1974).
    assert "exp(4G/π) = 3.209912" in grids.path.read_text(encoding="utf-8")
    assert many.path.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")


def _chromium(browser: str, uri: str, *options: str, cwd: Path) -> subprocess.CompletedProcess:
    """Run headless Chromium on a file URI with networking off."""
    return subprocess.run(
        [
            browser,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-background-networking",
            "--no-first-run",
            *options,
            uri,
        ],
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
        cwd=cwd,
    )


@pytest.mark.chromium
def test_report_renders_in_headless_chromium(tmp_path):
    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    if browser is None:
        pytest.skip("chromium is not on the PATH")
    written = write_report("grid:2..5", output=tmp_path / "grids.html")
    uri = written.path.resolve().as_uri()
    shot = tmp_path / "shot.png"
    done = _chromium(browser, uri, "--window-size=1000,1400", f"--screenshot={shot}", cwd=tmp_path)
    assert done.returncode == 0, done.stderr[-500:]
    from PIL import Image, ImageStat

    with Image.open(shot) as image:
        assert image.size == (1000, 1400)
        spread = ImageStat.Stat(image.convert("L")).stddev[0]
    assert spread > 10  # not a blank page: text, tables and figures were drawn
    dom = _chromium(browser, uri, "--dump-dom", cwd=tmp_path)
    assert "Spanning-tree growth" in dom.stdout
    assert Path(written.path).stat().st_size == written.size
