"""The diff's HTML page in headless Chromium (as ``test_html_browser`` opens the page of a run).

From the rendered DOM: the verdict, the worst-case margin change at each wavelength summed by hand
(-0.40 dB: see ``test_diff_html``), a segment named ``<script>alert(1)</script>`` shown as the text
of its cell with no script element in the page, both plots, and no request made by the page.
"""

from tests.report.test_diff_html import NEW_WORST_MARGIN_DB, OLD_WORST_MARGIN_DB, hostile_files
from tests.report.test_html import HOSTILE
from tests.report.test_html_browser import _Cells, rendered


def test_diff_page_renders_verdict_margin_change_and_escaped_name_and_loads_nothing(cli, tmp_path):
    old, new = hostile_files(tmp_path)
    report = tmp_path / "diff.html"
    assert cli("diff", old, new, "--format", "html", "-o", report).exit_code == 0
    dom, requests = rendered(report, tmp_path)
    assert requests == []
    assert '<span class="verdict closes" id="verdict">CLOSES</span>' in dom
    margins = _Cells("diff-margins")
    margins.feed(dom)
    assert [row[-1] for row in margins.rows if row] == [f"{NEW_WORST_MARGIN_DB - OLD_WORST_MARGIN_DB:+.2f}"] * 2
    segments = _Cells("diff-segments")
    segments.feed(dom)
    by_name = {row[1]: row for row in segments.rows if len(row) > 1}
    assert by_name[HOSTILE][0] == "added" and by_name[HOSTILE][-1] == "+0.80"  # its whole loss, by the datasheet
    assert "script" not in segments.tags
    assert segments.tags.count("svg") == 2
