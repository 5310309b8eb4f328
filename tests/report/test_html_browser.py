"""The HTML report in a real browser: headless Chromium (Debian's ``chromium``; ``.ci/run`` installs it).

Chromium renders the page and prints its DOM (``--dump-dom``); the checks read the rendered page:
the verdict, a row value summed by hand (the link of ``test_plots``: power after the panel, worst
case, -5 - 2 x 0.6 - 0.75 = -6.95 dBm) and a segment named ``<script>alert(1)</script>`` shown as the
text of its cell, with no script element anywhere in the page.

"Loads nothing from the network": Chromium runs with every host name unresolvable
(``--host-resolver-rules``), so nothing leaves the machine, and writes its network log
(``--log-net-log``); every request the page makes is in that log with the page's file:// origin as
its site (the browser's own background requests carry their own sites). A control page with an
image and a style sheet from elsewhere shows the log does catch a page's requests.
"""

import json
import shutil
import subprocess
from html.parser import HTMLParser

import pytest

from tests.report.test_html import HOSTILE, hand_link

CHROMIUM = shutil.which("chromium")
#: Chromium's start-up on a shared machine can be slow; the page itself renders in well under a second.
BROWSER_TIMEOUT_S = 180

CONTROL_PAGE = """<!DOCTYPE html><html><head><link rel="stylesheet" href="https://fonts.example.invalid/a.css">
</head><body><p>control</p><img src="http://images.example.invalid/a.png"></body></html>"""


def rendered(page, tmp_path):
    """Open ``page`` (a file) in headless Chromium: its rendered DOM, and the URLs the page requested."""
    if CHROMIUM is None:
        pytest.fail("chromium not found: install Debian's chromium package (.ci/run does: apt-get install chromium)")
    net_log = tmp_path / f"{page.stem}-net-log.json"
    done = subprocess.run(
        [CHROMIUM, "--headless", "--disable-gpu", "--no-sandbox", f"--user-data-dir={tmp_path / 'profile'}",
         "--no-first-run", "--disable-extensions", "--disable-background-networking", "--disable-component-update",
         "--disable-sync", "--host-resolver-rules=MAP * ~NOTFOUND", f"--log-net-log={net_log}",
         "--virtual-time-budget=5000", "--dump-dom", page.resolve().as_uri()],
        capture_output=True, text=True, timeout=BROWSER_TIMEOUT_S)
    assert done.returncode == 0, done.stderr[-2000:]
    return done.stdout, page_requests(json.loads(net_log.read_text(encoding="utf-8")))


def page_requests(net_log):
    """The URLs of the requests in a Chromium network log made by a page opened from a file."""
    names = {number: name for name, number in net_log["constants"]["logEventTypes"].items()}
    starts = [event.get("params", {}) for event in net_log["events"] if names[event["type"]] == "URL_REQUEST_START_JOB"]
    return [params["url"] for params in starts if "url" in params
            and "file://" in params.get("site_for_cookies", "") + params.get("network_isolation_key", "")]


class _Cells(HTMLParser):
    """The text of each cell of the table ``table_id``, row by row; and every element's tag."""

    def __init__(self, table_id):
        super().__init__(convert_charrefs=True)
        self.table_id, self.inside, self.rows, self.tags, self.cell = table_id, False, [], [], None

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        if tag == "table":
            self.inside = dict(attrs).get("id") == self.table_id
        elif self.inside and tag == "tr":
            self.rows.append([])
        elif self.inside and tag == "td":
            self.cell = ""

    def handle_endtag(self, tag):
        if tag == "table":
            self.inside = False
        elif self.inside and tag == "td":
            self.rows[-1].append(self.cell)
            self.cell = None

    def handle_data(self, data):
        if self.cell is not None:
            self.cell += data


def test_control_page_requests_are_seen(tmp_path):
    """The network log shows a page's requests, so an empty list for the report means something."""
    control = tmp_path / "control.html"
    control.write_text(CONTROL_PAGE, encoding="utf-8")
    _, requests = rendered(control, tmp_path)
    assert "https://fonts.example.invalid/a.css" in requests
    assert "http://images.example.invalid/a.png" in requests


def test_report_renders_verdict_row_and_escaped_name_and_loads_nothing(cli, write_link, tmp_path):
    link = hand_link(write_link, first=f"'{HOSTILE}'")
    report = tmp_path / "report.html"
    assert cli("run", link, "--format", "html", "-o", report).exit_code == 0
    dom, requests = rendered(report, tmp_path)
    assert requests == []
    assert '<span class="verdict closes" id="verdict">CLOSES</span>' in dom
    cells = _Cells("budget")
    cells.feed(dom)
    by_name = {row[1]: row for row in cells.rows if len(row) > 1}
    assert by_name["panel"][7] == "-6.95"  # power after the panel, worst case [dBm], summed by hand
    assert HOSTILE in by_name  # the name is the text of its cell ...
    assert "script" not in cells.tags  # ... and no script element exists
    assert cells.tags.count("svg") == 2  # the power levels and the margin against wavelength
