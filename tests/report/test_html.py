"""The HTML report: content, escaping of user strings, nothing loaded from elsewhere, the file rules.

Its numbers come from the hand-summed link of ``test_plots`` (see that module): the power after
the panel in the worst case is -5 - 2 x 0.6 - 0.75 = -6.95 dBm.
"""

import hashlib
import math
import re
import subprocess
import sys

import pytest

import linkbudget
from linkbudget.cautions import CAUTIONS
from linkbudget.report import html
from tests.conftest import CONFIGS
from tests.report.test_plots import HAND_LINK, WITHOUT_MATPLOTLIB

HOSTILE = "<script>alert(1)</script>"

#: Markup that would make a browser fetch something: an address in src/href/action/poster/data,
#: a style sheet import or a url() that is not a reference inside the page (#id).
_FETCHING = [
    re.compile(r"""\b(?:src|href|action|poster|data|srcset|background)\s*=\s*["']?\s*(?!#)[^"'\s>]""", re.I),
    re.compile(r"@import", re.I),
    re.compile(r"""url\(\s*["']?\s*(?!#)""", re.I),
    re.compile(r"<\s*(?:script|link|img|iframe|object|embed|base|meta\s+http-equiv)\b", re.I),
]


def fetching_markup(page):
    """Every piece of ``page``'s markup (its tags and style sheets; text between tags cannot load
    anything) that would load something: an empty list for a self-contained page."""
    markup = "\n".join(re.findall(r"<[^>]*>", page) + re.findall(r"<style>(.*?)</style>", page, re.S))
    return [match.group(0) for pattern in _FETCHING for match in pattern.finditer(markup)]


def hand_link(write_link, first="trunk", title="Hand-summed plot link"):
    text = HAND_LINK.format(axis="channels: [1310 nm, 1550 nm]", first=first)
    return write_link(text.replace("title: Hand-summed plot link", f"title: {title}"))


def page_of(path):
    result = linkbudget.evaluate(linkbudget.load(path))
    return html.render(result, input_sha256=html.file_sha256(path))


def test_fetching_markup_finds_what_would_load():
    """The check itself sees each way a page could load something (so an empty answer means something)."""
    for markup in ['<img src="http://x/a.png">', "<a href='//x/y'>", '<p style="background: url(http://x/a)">',
                   "<style>@import 'x.css';</style>", '<script>1</script>', '<use xlink:href="http://x/#a"/>']:
        assert fetching_markup(markup), markup
    assert fetching_markup('<svg><use xlink:href="#m1"/><path clip-path="url(#p1)"/></svg>') == []
    assert fetching_markup("<p>a src=x and url(x) as text</p>") == []


@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_example_pages_load_nothing(config):
    page = page_of(config)
    assert fetching_markup(page) == []
    assert page.count("<svg") == (2 if "channels" in config.read_text() or "band" in config.read_text() else 1)


def test_page_holds_verdict_rows_margins_cautions_and_provenance(write_link):
    path = hand_link(write_link)
    page = page_of(path)
    assert '<span class="verdict closes" id="verdict">CLOSES</span>' in page
    panel_row = re.search(r"<tr><td[^>]*>2</td><td[^>]*>panel</td>.*?</tr>", page).group(0)
    assert '<td class="number">-6.95</td>' in panel_row  # power after, worst case, summed by hand
    assert "<td class=\"text\">1310 nm</td>" in page and "<td class=\"text\">1550 nm</td>" in page
    for caution in CAUTIONS:
        assert html.text(caution) in page
    assert hashlib.sha256(path.read_bytes()).hexdigest() in page
    assert f"linkbudget {linkbudget.__version__}" in page


def test_page_escapes_every_user_string(write_link):
    path = hand_link(write_link, first=f"'{HOSTILE}'", title="'<b onmouseover=alert(2)>bold</b> & \"quoted\"'")
    text = path.read_text().replace("title:", 'description: "<img src=x onerror=alert(3)>"\ntitle:', 1)
    page = page_of(write_link(text))
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "&lt;b onmouseover=alert(2)&gt;bold&lt;/b&gt; &amp; &quot;quoted&quot;" in page
    assert "&lt;img src=x onerror=alert(3)&gt;" in page
    assert not re.search(r"<\s*(?:script|b|img)\b", page, re.I)
    assert fetching_markup(page) == []


def test_extra_sections_come_after_the_margins_and_before_the_plots(write_link):
    """The place a statistics (or comparison) section takes in the page of a run."""
    result = linkbudget.evaluate(linkbudget.load(hand_link(write_link)))
    extra = html.Section("Statistics <draws>", "statistics", "<p>body</p>")
    page = html.render(result, input_sha256="0" * 64, sections=[extra])
    order = [page.index(f'<section id="{name}"') for name in
             ("verdict-section", "budget-section", "margin-section", "statistics", "plots-section", "cautions")]
    assert order == sorted(order)
    assert "<h2>Statistics &lt;draws&gt;</h2>" in page


def test_run_format_html_writes_a_file_and_keeps_an_existing_one(cli, write_link, tmp_path):
    path = hand_link(write_link)
    report = tmp_path / "report.html"
    assert cli("run", path, "--format", "html", "-o", report).exit_code == 0
    assert report.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    report.write_text("mine")
    refused = cli("run", path, "--format", "html", "-o", report)
    assert refused.exit_code == 2 and "pass --force" in refused.stderr and report.read_text() == "mine"
    assert cli("run", path, "--format", "html", "-o", report, "--force").exit_code == 0
    assert "CLOSES" in report.read_text(encoding="utf-8")


def test_run_format_html_without_the_extra_says_so_in_the_page(write_link):
    path = hand_link(write_link)
    done = subprocess.run([sys.executable, "-c", WITHOUT_MATPLOTLIB, "run", str(path), "--format", "html"],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert '<p class="missing-plots">plots need matplotlib: pip install &quot;linkbudget[plot]&quot;</p>' in done.stdout
    assert "<svg" not in done.stdout and "CLOSES" in done.stdout


def test_page_shows_the_review_of_reachable_points_escaped(write_link):
    # A 1550 nm source of up to 14 dBm (10^1.4 = 25.1 mW) straight into a connector, then 20 dB:
    # the source output and the connector hold 25.1 mW against the 10 mW Class 1 limit above
    # 1400 nm (IEC 60825-1:2007, from memory), 10·log10(25.1/10) = 4.00 dB over; the receiver
    # input holds 0.251 mW.
    path = write_link("title: review page\nwavelength: 1550 nm\nsource:\n  power: {min: 10 dBm, max: 14 dBm}\n"
                      "receiver:\n  sensitivity: -30 dBm\nchain:\n"
                      f"  - name: '{HOSTILE}'\n    kind: connector\n    loss: 0 dB\n"
                      "  - name: pad\n    kind: element\n    loss: 20 dB\n")
    page = page_of(path)
    section = page[page.index('id="review-section"'):page.index("</section>", page.index('id="review-section"'))]
    assert HOSTILE not in page and html.text(HOSTILE) in section
    assert f"{10 ** 1.4:.1f}" in section and f"-{10 * math.log10(10 ** 1.4 / 10):.2f}" in section
    assert f"{10 ** 1.4 / 100:.3f}" in section
    assert section.count('class="status-short"') == 2 and fetching_markup(page) == []
