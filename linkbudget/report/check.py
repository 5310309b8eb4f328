"""The reports of ``check``, the CI gate: its lines, Markdown, JSON (``linkbudget.check/1``,
documented in ``docs/json-check.md``) and JUnit XML.

Each reads a list of :class:`CheckOutcome` s: a link that loaded and was evaluated (its result),
or one that did not load (its placed error text). JUnit XML is written as CI systems read it
(one ``<testsuite>`` in ``<testsuites>``, one ``<testcase>`` per link, a ``<failure>`` where the
link does not close, an ``<error>`` where it does not load), built with
:mod:`xml.etree.ElementTree`, which escapes every user string; characters XML 1.0 cannot hold at
all (most control characters) are first shown as escapes (:func:`linkbudget.text.escaped`).
"""

import re
from dataclasses import dataclass

from linkbudget import __version__
from linkbudget.report.json import DB_RESOLUTION_DECIMALS, _number, json_text
from linkbudget.report.markdown import _table, markdown_text
from linkbudget.report.summary import budget_reasons, check_error_line, check_line, check_summary, db_text, fixed
from linkbudget.text import escaped

SCHEMA = "linkbudget.check/1"
#: The statuses of a checked link.
STATUSES = (PASS, FAIL, ERROR) = ("pass", "fail", "error")
#: The JUnit ``classname`` of every case (CI systems group cases by it).
JUNIT_CLASS = "linkbudget.check"


@dataclass(frozen=True)
class CheckOutcome:
    """One checked link: its name, and its result or the text of its input error, and the gates of
    its review it fails (:func:`linkbudget.gates.gate_failures`, in words)."""

    name: str
    result: object = None
    error: str | None = None
    seconds: float = 0.0
    least_yield: float | None = None  # gate on the statistical budget's yield (``--min-yield``), not the worst case
    failures: tuple = ()  # the review's gate failures (linkbudget.gates.gate_failures)

    @property
    def passes(self):
        """The link loaded and nothing fails (:attr:`reasons`)."""
        return self.result is not None and not self.reasons

    @property
    def status(self):
        return ERROR if self.result is None else PASS if self.passes else FAIL

    @property
    def reasons(self):
        """What fails, in words (empty for a link that passes or does not load)."""
        return [] if self.result is None else self._budget_reasons() + list(self.failures)

    @property
    def budget_passes(self):
        """The link loaded and its budget passes: it closes, or with ``--min-yield`` its yield
        reaches the least asked (the gates of its review aside)."""
        return self.result is not None and not self._budget_reasons()

    def _budget_reasons(self):
        if self.least_yield is None:
            return budget_reasons(self.result)
        reached = self.result.statistics.yield_fraction >= self.least_yield
        return [] if reached else ["yield below the least asked"]

    @property
    def worst_margin_db(self):
        return float(self.result.margin_db["worst"].min())

    @property
    def line(self):
        """The gate's line for the link (as ``check`` prints it)."""
        if self.result is None:
            return check_error_line(self.name)
        if self.least_yield is not None:
            from linkbudget.report.statistics_table import yield_check_line

            line = yield_check_line(self.result, self.name, self.least_yield)
            return line + (f" ({', '.join(self.failures)})" if self.failures else "")
        return check_line(self.result, self.name, self.reasons)


def counts(outcomes):
    """(links, whose budget passes, whose budget fails, input errors): a budget passes when the
    link closes, or with ``--min-yield`` when its yield reaches the least asked
    (:attr:`CheckOutcome.budget_passes`), so that the counts follow the per-link lines."""
    loaded = [outcome for outcome in outcomes if outcome.result is not None]
    passes = sum(outcome.budget_passes for outcome in loaded)
    return len(outcomes), passes, len(loaded) - passes, len(outcomes) - len(loaded)


def _by_yield(outcomes):
    """Whether the budgets are judged by their yield (``--min-yield``) rather than closing."""
    return any(outcome.least_yield is not None for outcome in outcomes)


def gated(outcomes):
    """How many links fail a gate of their review (eye safety, back reflection, PDL)."""
    return sum(bool(outcome.failures) for outcome in outcomes)


def failed(outcomes):
    """How many links fail: do not close, or fail a gate."""
    return sum(outcome.status == FAIL for outcome in outcomes)


def summary_line(outcomes):
    """The gate's last line."""
    return check_summary(*counts(outcomes), gated(outcomes), by_yield=_by_yield(outcomes))


def render_lines(outcomes):
    """The plain report: one line per link and the summary."""
    return "\n".join([outcome.line for outcome in outcomes] + [summary_line(outcomes)]) + "\n"


def render_markdown(outcomes):
    """A Markdown table of the links for a pull-request comment (errors in full, escaped)."""
    count, closes, fails, broken = counts(outcomes)
    mark = "✅" if failed(outcomes) == broken == 0 else "❌"
    verb = "reach the least yield" if _by_yield(outcomes) else "close"
    lines = [f"### {mark} linkbudget check: {closes} of {count} link(s) {verb}", ""]
    rows = [[markdown_text(outcome.name), outcome.status.upper(),
             ", ".join(outcome.reasons) if outcome.result is not None
             else "<br>".join(markdown_text(line) for line in outcome.error.splitlines()),
             "" if outcome.result is None else db_text(outcome.worst_margin_db, signed=True),
             "" if outcome.result is None else fixed(outcome.result.required_margin_db)]
            for outcome in outcomes]
    lines += _table(["link", "status", "what fails", "worst margin dB", "required dB"], rows, text_columns=3)
    lines += ["", summary_line(outcomes), ""]
    return "\n".join(lines)


def check_dict(outcomes, required_margin_db=None):
    """The gate's outcome as plain JSON-ready data."""
    count, closes, fails, broken = counts(outcomes)

    def entry(outcome):
        result = outcome.result
        loaded = result is not None
        return {"file": outcome.name, "status": outcome.status,
                "title": result.title if loaded else None,
                "closes": result.closes if loaded else None,
                "margin_ok": result.margin_ok if loaded else None,
                "overload_ok": result.overload_ok if loaded else None,
                "worst_margin_db": _number(outcome.worst_margin_db, DB_RESOLUTION_DECIMALS) if loaded else None,
                "required_margin_db": _number(result.required_margin_db, DB_RESOLUTION_DECIMALS) if loaded else None,
                "reasons": outcome.reasons, "error": outcome.error}

    return {"schema": SCHEMA, "tool": {"name": "linkbudget", "version": __version__},
            "min_margin_db": None if required_margin_db is None else _number(required_margin_db,
                                                                              DB_RESOLUTION_DECIMALS),
            "links": [entry(outcome) for outcome in outcomes],
            "summary": {"links": count, "close": closes, "do_not_close": fails, "input_errors": broken,
                        "judged_by": "yield" if _by_yield(outcomes) else "closing",
                        "fail_a_gate": gated(outcomes)}}


def render_json(outcomes, required_margin_db=None):
    return json_text(check_dict(outcomes, required_margin_db))


#: The characters XML 1.0 cannot hold (its ``Char`` production's complement).
_NOT_XML = re.compile("[^\t\n\r\x20-\ud7ff\ue000-\ufffd\U00010000-\U0010ffff]")


def _xml_safe(text):
    """``text`` with every character XML 1.0 cannot hold shown as an escape (the rest is already
    escaped text of a message, or is escaped by the XML writer)."""
    return _NOT_XML.sub(lambda match: escaped(match.group()), str(text))


def render_junit(outcomes):
    """JUnit XML: one test case per link, a failure where it does not close, an error where it
    does not load."""
    import xml.etree.ElementTree as ElementTree

    count, _, _, broken = counts(outcomes)
    fails = failed(outcomes)
    total_seconds = sum(outcome.seconds for outcome in outcomes)
    suites = ElementTree.Element("testsuites", name="linkbudget", tests=str(count), failures=str(fails),
                                 errors=str(broken), time=f"{total_seconds:.3f}")
    suite = ElementTree.SubElement(suites, "testsuite", name="linkbudget check", tests=str(count),
                                   failures=str(fails), errors=str(broken), skipped="0",
                                   time=f"{total_seconds:.3f}")
    for outcome in outcomes:
        case = ElementTree.SubElement(suite, "testcase", classname=JUNIT_CLASS, name=escaped(outcome.name),
                                      time=f"{outcome.seconds:.3f}")
        if outcome.status == FAIL:
            failure = ElementTree.SubElement(case, "failure", type="link does not close" if not outcome.result.closes
                                             else "link fails a gate",
                                             message=_xml_safe(outcome.line))
            failure.text = _xml_safe(outcome.line)
        elif outcome.status == ERROR:
            error = ElementTree.SubElement(case, "error", type="input error", message=_xml_safe(outcome.line))
            error.text = _xml_safe(outcome.error)
        else:
            ElementTree.SubElement(case, "system-out").text = _xml_safe(outcome.line)
    ElementTree.indent(suites)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ElementTree.tostring(suites, encoding="unicode") + "\n"
