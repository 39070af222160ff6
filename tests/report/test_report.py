"""The HTML report: structure, self-containment, escaping, rendering, reproducibility."""

import base64
import re
import shutil
import subprocess
import tempfile
from html.parser import HTMLParser

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.data import read_series
from bayesgrowth.report import SECTIONS, build_report

VOID = {"meta", "img", "br", "hr", "link", "input", "source", "col", "area", "base", "wbr"}


class _Checker(HTMLParser):
    """Collects section ids, image sources and any unbalanced tag (HTML Living Standard void
    elements excepted)."""

    def __init__(self):
        super().__init__()
        self.stack, self.errors, self.sections, self.images, self.refs = [], [], [], [], []

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        if tag == "section":
            self.sections.append(attrs.get("id"))
        if tag == "img":
            self.images.append(attrs.get("src", ""))
        for key in ("src", "href"):
            if key in attrs:
                self.refs.append(attrs[key])
        if tag not in VOID:
            self.stack.append(tag)

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"unexpected </{tag}>")
        else:
            self.stack.pop()


@pytest.fixture(scope="module")
def page(demo):
    return build_report(demo, 8, engine="exact", seed=3, target=9000, timestamp="fixed")


def _check(page):
    checker = _Checker()
    checker.feed(page)
    checker.close()
    return checker


def test_page_parses_and_has_every_section_in_order(page):
    c = _check(page)
    assert c.errors == [] and c.stack == []
    assert c.sections == list(SECTIONS)
    assert page.startswith("<!DOCTYPE html>")


def test_figures_are_embedded_pngs(page):
    c = _check(page)
    assert len(c.images) >= 3
    for src in c.images:
        assert src.startswith("data:image/png;base64,")
        assert base64.b64decode(src.split(",", 1)[1])[:8] == b"\x89PNG\r\n\x1a\n"


def test_no_external_resource(page):
    c = _check(page)
    assert all(ref.startswith("data:") for ref in c.refs)
    lowered = page.lower()
    for fragment in ("<script", "<link", "@import", "url(", "http://", "https://", "<iframe"):
        assert fragment not in lowered, fragment


def test_headline_caution_and_reproduction(page):
    assert "Probability of reaching 9,000" in page
    assert "not investment advice" in page
    assert "Input fingerprint" in page and "bayesgrowth version" in page
    assert "bands too narrow" in page or "calibrated" in page


def test_backtest_section_names_the_model_not_its_engine(page):
    # The report's own model is backtested beside two plain methods: its verdict reads as
    # the model's, in the headline and the section, not as an engine's ("exact: ...").
    from bayesgrowth.report.html import BACKTEST_NAME

    items = re.findall(r"<li>([^:<]+): ", page.split('id="calibration"')[1].split("</ul>")[0])
    assert items == [BACKTEST_NAME, "log-linear", "naive"]
    assert "<li>exact:" not in page


def test_user_text_is_escaped():
    evil = "<script>alert(1)</script>"
    frame = pd.DataFrame({"period": ["2024Q1", "2024Q2", "2024Q3", "2024Q4"],
                          "value": [10.0, 11.0, 12.5, 13.4]})
    s = read_series(frame, name=evil)
    html_text = build_report(s, 2, engine="exact", seed=1, with_backtest=False, timestamp="t")
    assert evil not in html_text
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in html_text
    assert "<script" not in html_text.lower()


def test_same_input_and_seed_same_report(demo):
    a = build_report(demo, 4, engine="exact", seed=5, timestamp="t")
    b = build_report(demo, 4, engine="exact", seed=5, timestamp="t")
    assert a == b
    c = build_report(demo, 4, engine="exact", seed=5)
    assert re.sub(r"\d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC", "t", c) == a


def test_cli_report_prints_the_pages_cautions(tmp_path, capsys):
    # The demo has 20 quarters: a horizon of 12 is more than half of them; the page lists
    # the caution, and the command prints it with the short general one.
    from bayesgrowth.data.demo import demo_path

    out = tmp_path / "rep"
    assert main(["report", str(demo_path()), "-H", "12", "--engine", "exact", "--out",
                 str(out), "--quiet", "--no-backtest"]) == 0
    cautions = [line for line in capsys.readouterr().out.splitlines()
                if line.startswith("caution: ")]
    assert len(cautions) == 2 and "more than half the history (20 periods)" in cautions[0]
    assert cautions[0].removeprefix("caution: ") in (out / "report.html").read_text()
    assert cautions[1].endswith("it is not investment advice")


def test_cli_report(tmp_path):
    from bayesgrowth.data.demo import demo_path

    out = tmp_path / "rep"
    assert main(["report", str(demo_path()), "-H", "6", "--engine", "exact", "--out", str(out),
                 "--quiet"]) == 0
    assert (out / "report.html").read_text().count("<section") == len(SECTIONS)


def _chromium():
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    pytest.skip("no Chromium on this machine (.ci/run installs Debian's chromium); "
                "the rendering check did not run")


CHROME_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                "--disable-background-networking", "--disable-component-update",
                "--disable-sync", "--hide-scrollbars"]


def test_renders_in_headless_chromium_without_horizontal_scroll(tmp_path, page):
    chrome = _chromium()
    html_path = tmp_path / "report.html"
    html_path.write_text(page)
    shot = tmp_path / "shot.png"
    profile = tempfile.mkdtemp()
    subprocess.run([chrome, *CHROME_FLAGS, f"--user-data-dir={profile}",
                    "--window-size=1366,900", f"--screenshot={shot}", html_path.as_uri()],
                   capture_output=True, timeout=120, check=False)
    assert shot.exists(), "Chromium wrote no screenshot"
    import matplotlib.image as mpimg

    pixels = mpimg.imread(shot)
    assert pixels.shape[1] == 1366
    assert np.std(pixels[..., :3]) > 0.05  # not a blank page
    # Width check on a copy with a probe script (the report itself has none): the
    # page's scroll width must not exceed the 1366-pixel viewport.
    probe = tmp_path / "probe.html"
    probe.write_text(page.replace(
        "</body>", "<script>document.title='W'+document.documentElement.scrollWidth+"
                   "'V'+window.innerWidth;</script></body>"))
    dom = subprocess.run([chrome, *CHROME_FLAGS, f"--user-data-dir={profile}",
                          "--window-size=1366,900", "--dump-dom", "--virtual-time-budget=2000",
                          probe.as_uri()], capture_output=True, text=True, timeout=120,
                         check=False).stdout
    found = re.search(r"<title>W(\d+)V(\d+)</title>", dom)
    assert found, "the probe did not report the page width"
    scroll, viewport = int(found.group(1)), int(found.group(2))
    assert scroll <= viewport
    shutil.rmtree(profile, ignore_errors=True)


def _headline_paragraph(page: str) -> str:
    found = re.search(r'<p class="headline">(.*?)</p>', page, flags=re.S)
    assert found, "no headline paragraph"
    return re.sub(r"<[^>]+>", "", found.group(1))


def test_headline_says_median_growth_per_quarter_and_every_band(page):
    head = _headline_paragraph(page)
    assert head.startswith("Median forecast for 2027Q4:")
    assert "Growth per quarter" in head and "per period" not in head
    for level in (50, 80, 95):
        assert f"{level}% band" in head
    assert "Expected value" not in page


def test_headline_follows_the_levels_given_and_never_prints_certainty(demo):
    page = build_report(demo, 4, engine="exact", seed=2, levels=(60, 90), target=1.0,
                        with_backtest=False, timestamp="t", unit="Revenue (EUR thousand)",
                        fit_options={"model": "exponential"})
    head = _headline_paragraph(page)
    assert "60% band" in head and "90% band" in head and "80% band" not in head
    # A target far below every draw: the probability prints as "> 99%", not "100%".
    assert "Probability of reaching 1 by 2026Q4: > 99%." in head
    assert "100%" not in head
    assert "Forecast table (Revenue (EUR thousand); quarterly periods)" in page
    assert "Quarters ahead" in page


def test_an_exact_fit_reports_no_sampling_checks_it_did_not_make(page):
    # The exact engine has no chains: no R-hat, no divergences to report.
    section = page[page.index("Sampling diagnostics"):page.index("Cautions")]
    assert "Computed exactly: no sampling" in section
    assert "R-hat" not in section and "Divergent" not in section
    assert "Independent draws" in section


def test_notes_about_the_data_are_among_the_cautions():
    # invented: twelve quarters of 4% growth, one keyed a hundred times too large
    values = [1000 * 1.04**i for i in range(12)]
    values[6] *= 100
    frame = pd.DataFrame({"period": [f"{2022 + i // 4}Q{i % 4 + 1}" for i in range(12)],
                          "value": values})
    with pytest.warns(UserWarning, match="100 times"):
        s = read_series(frame)
    html_text = build_report(s, 2, engine="exact", seed=1, with_backtest=False, timestamp="t")
    cautions = html_text[html_text.index('id="cautions"'):]
    assert "About the data:" in cautions and "2023Q3" in cautions
