"""Malformed link files: exit code 2 and a placed message, never a traceback.

The contract checked here is the one README.md states for input errors: exit code 2, and a
message ``FILE:LINE:COL: key.path: message`` (with an optional ``hint:`` line) on standard error.
Every case is a small edit of the minimal link of ``tests/conftest.py``; where the error sits is
written as the text at which the offending node starts, with ``|`` at the expected column
(``"power: |0 dB"`` is the column of ``0``), so the expected line and column follow from the text.
"""

import re
from dataclasses import dataclass

import pytest

import linkbudget
from linkbudget.config.source import format_key_path
from tests.conftest import MINIMAL_LINK

#: Marker for a case whose error may sit at any line and column (a node-count bound is hit
#: wherever the expansion happens to cross it).
ANYWHERE = "anywhere"


@dataclass(frozen=True)
class Case:
    id: str
    text: str | bytes
    at: str | tuple | None  # "before|after" text, (line, column), or ANYWHERE
    path: str | None  # the key path the message names; None for any
    phrases: tuple  # each must appear in the message or its hint


def edit(old, new):
    """The minimal link with the one occurrence of ``old`` replaced by ``new``."""
    assert MINIMAL_LINK.count(old) == 1, old
    return MINIMAL_LINK.replace(old, new)


def append(segment):
    """The minimal link with one more chain item (text indented as a chain item)."""
    return MINIMAL_LINK + segment


def without_chain(chain_text):
    """The minimal link with its ``chain`` replaced by ``chain_text``."""
    return MINIMAL_LINK[: MINIMAL_LINK.index("chain:")] + chain_text


def expected_mark(text, at):
    """(line, column), both 1-based, of the ``|`` in ``at`` within ``text``."""
    if isinstance(at, tuple):
        return at
    before, _, after = at.partition("|")
    assert text.count(before + after) == 1, f"{at!r} must occur once in the case text"
    offset = text.index(before + after) + len(before)
    line = text.count("\n", 0, offset) + 1
    column = offset - (text.rfind("\n", 0, offset) + 1) + 1
    return line, column


#: Nine levels of nine aliases each: 9**9 (about 4e8) scalars from a 400-byte text.
BILLION_LAUGHS = "a: &a [x, x, x, x, x, x, x, x, x]\n" + "".join(
    f"{name}: &{name} [{', '.join([f'*{previous}'] * 9)}]\n"
    for previous, name in zip("abcdefgh", "bcdefghi", strict=True)
)

DEEP_NESTING = "title: " + "[" * 2000 + "]" * 2000 + "\n"

HOP = "  - name: hop\n    kind: gap\n    length: 1 mm\n"

WINDOW = "  - name: window\n    kind: medium\n    thickness: 1 mm\n"

CASES = [
    Case("yaml-syntax", edit("  sensitivity: -30 dBm", "  sensitivity: -30 dBm: x"),
         "-30 dBm|: x", "(top level)", ("YAML syntax error", "mapping values are not allowed")),
    Case("tab-indentation", edit("  power: 0 dBm", "\tpower: 0 dBm"),
         "|\tpower", "(top level)", ("YAML syntax error", "indent with spaces, not tabs")),
    Case("bare-number-length", edit("length: 2 km", "length: 2000"),
         "length: |2000", "chain[0].length", ("missing unit", "units: nm, um")),
    Case("bare-number-attenuation", edit("attenuation: 0.5 dB/km", "attenuation: [0.5]"),
         "attenuation: |[0.5]", "chain[0].attenuation", ("expected an attenuation such as",)),
    Case("angle-where-length", edit("length: 2 km", "length: 2 deg"),
         "length: |2 deg", "chain[0].length", ("'2 deg' is an angle, expected a length",)),
    Case("bare-number-wavelength", edit("wavelength: 1310 nm", "wavelength: 1550"),
         "wavelength: |1550", "wavelength", ("missing unit", "e.g. '1550 nm'")),
    Case("default-air-beyond-its-data", edit("wavelength: 1310 nm", "wavelength: 2000 nm") + HOP,
         "  - |name: hop", "chain[2]", ("no `material` or `index` written", "air (the default)",
                                        "2000 nm is outside", "explicit `index`")),
    Case("written-air-beyond-its-data", edit("wavelength: 1310 nm", "wavelength: 2000 nm") + HOP
         + "    material: air\n", "material: |air", "chain[2].material", ("2000 nm is outside", "explicit `index`")),
    Case("dB-where-dBm", edit("power: 0 dBm", "power: 0 dB"),
         "power: |0 dB", "source.power", ("is a ratio, expected a power", "dBm")),
    Case("unknown-unit", edit("length: 2 km", "length: 2 kmm"),
         "length: |2 kmm", "chain[0].length", ("unknown unit 'kmm'", "units: nm, um")),
    Case("unknown-top-level-key", edit("title:", "titel:"),
         "|titel:", "titel", ("unknown key 'titel'", "did you mean 'title'?")),
    Case("unknown-segment-key", edit("    attenuation:", "    attenuaton:"),
         "    |attenuaton:", "chain[0].attenuaton", ("unknown key 'attenuaton'", "did you mean 'attenuation'?")),
    Case("unknown-spread-key", edit("length: 2 km", "length: {typ: 2 km, mx: 3 km}"),
         "|mx:", "chain[0].length.mx", ("unknown key 'mx'", "did you mean 'max'?")),
    Case("unknown-kind", edit("kind: connector", "kind: conector"),
         "kind: |conector", "chain[1].kind", ("unknown segment kind 'conector'", "did you mean 'connector'?")),
    Case("missing-kind", edit("    kind: connector\n", ""),
         "  - |name: panel", "chain[1].kind", ("missing required key 'kind'", "kinds: ")),
    Case("kind-is-a-list", edit("kind: connector", "kind: [connector]"),
         "kind: |[connector]", "chain[1].kind", ("segment kind",)),
    Case("list-where-mapping", edit("source:\n  power: 0 dBm", "source: [0 dBm]"),
         "source: |[0 dBm]", "source", ("expected a mapping of keys",)),
    Case("string-where-count", append("  - kind: splice\n    loss: 0.1 dB\n    count: many\n"),
         "count: |many", "chain[2].count", ("expected a whole number", "'many'")),
    # found by the fuzz test: a count beyond float range raised OverflowError in the splice's loss,
    # ports beyond int64 a ValueError in the split loss (tests/data/fuzz/huge-count--*.yaml)
    Case("huge-count", append("  - kind: splice\n    loss: 0.1 dB\n    count: " + "9" * 400 + "\n"),
         "count: |" + "9" * 400, "chain[2].count", ("splice count must be from 1 to", "got a 400-digit number")),
    Case("huge-ports", append("  - kind: splitter\n    ports: 83333333333333333333\n"),
         "ports: |83333333333333333333", "chain[2].ports", ("got a 20-digit number",)),
    Case("unknown-tilt-direction", edit("    loss: 0.5 dB\n", "    loss: 0.5 dB\n    offset: 1 um\n    tilt: 0.2 deg\n"
                                        "    tilt_direction: toward\n"),
         "tilt_direction: |toward", "chain[1].tilt_direction",
         ("must be 'along-offset', 'against-offset' or 'across-offset'",)),
    Case("chain-item-not-a-mapping", append("  - just some text\n"),
         "  - |just some text", "chain[2]", ("a chain item must be a mapping",)),
    Case("normal-spread-reaching-zero", append(
        "  - kind: gap\n    length: 1 km\n    visibility: {mean: 1 km, sigma: 0.5 km}\n"),
         "sigma: |0.5 km", "chain[2].visibility.sigma", ("mean - 3 sigma must stay within the range of the visibility",)),
    Case("zero-mode-field-diameter", edit("length: 2 km", "length: 2 km\n    mode_field_diameter: 0 um"),
         "mode_field_diameter: |0 um", "chain[0].mode_field_diameter", ("mode field diameter must be from 0.1 um to 1000 um",)),
    Case("negative-length", edit("length: 2 km", "length: -2 km"),
         "length: |-2 km", "chain[0].length", ("fibre length must be from 0 km to 40000 km",)),
    Case("index-kappa-below-zero", append(WINDOW + "    index: 1.45-1e-6j\n"),
         "index: |1.45-1e-6j", "chain[2].index", ("kappa", "passive medium")),
    Case("negative-kappa", append(WINDOW + "    kappa: -1e-4\n"),
         "kappa: |-1e-4", "chain[2].kappa", ("extinction coefficient must be from 0 to 200",)),
    Case("negative-absorption", append(WINDOW + "    absorption: -0.5 /cm\n"),
         "absorption: |-0.5 /cm", "chain[2].absorption", ("absorption coefficient must be from 0 /m",)),
    Case("empty-chain", without_chain("chain: []\n"),
         "chain: |[]", "chain", ("needs at least one item",)),
    Case("alias-bomb", BILLION_LAUGHS,
         ANYWHERE, None, ("more than 100000 nodes", "alias")),
    Case("python-object-tag",
         edit("title: Minimal test link", "title: !!python/object/apply:os.system ['touch {TMP}/marker']"),
         "title: |!!python", "title", ("unsupported YAML tag", "python/object/apply:os.system")),
    # a date is text (YAML 1.2 core schema); only a written !!timestamp tag asks for a date
    Case("timestamp-tag", edit("title: Minimal test link", "title: !!timestamp 2024-05-01"),
         "title: |!!timestamp", "title", ("unsupported YAML tag", "timestamp")),
    Case("number-beyond-float", edit("length: 2 km", "length: 1e400 m"),
         "length: |1e400 m", "chain[0].length", ("not a finite number",)),
    # 1e306 is a finite float, but 1e306 km = 1e309 m is not.
    Case("number-beyond-float-after-unit", edit("length: 2 km", "length: 1e306 km"),
         "length: |1e306 km", "chain[0].length", ("finite",)),
    Case("nan-index", append(WINDOW + "    index: .nan\n"),
         "index: |.nan", "chain[2].index", ("not finite",)),
    Case("nan-length", edit("length: 2 km", "length: nan m"),
         "length: |nan m", "chain[0].length", ("cannot read 'nan m' as a length",)),
    Case("inverted-spread", edit("length: 2 km", "length: {typ: 2 km, max: 1 km}"),
         "max: |1 km", "chain[0].length.max", ("min <= typ <= max",)),
    Case("mean-without-sigma", edit("loss: 0.5 dB", "loss: {mean: 0.5 dB}"),
         "loss: |{mean", "chain[1].loss", ("{mean, sigma}",)),
    Case("sigma-of-power-in-dBm", edit("power: 0 dBm", "power: {mean: 0 dBm, sigma: 1 dBm}"),
         "sigma: |1 dBm", "source.power.sigma", ("is a power, expected a ratio",)),
    Case("wavelength-and-channels", edit("wavelength: 1310 nm", "wavelength: 1310 nm\nchannels: [1310 nm, 1550 nm]"),
         "channels: |[1310", "channels", ("exactly one of wavelength, channels or band",)),
    Case("wavelength-outside-optical-range", edit("wavelength: 1310 nm", "wavelength: 50 nm"),
         "wavelength: |50 nm", "wavelength", ("wavelength must be from 100 nm to 100000 nm", "optical range")),
    Case("channel-outside-optical-range", edit("wavelength: 1310 nm", "channels: [1310 nm, 200 um]"),
         "|200 um", "channels[1]", ("wavelength must be from 100 nm to 100000 nm", "optical range")),
    Case("band-from-above-to", edit("wavelength: 1310 nm", "band: {from: 1600 nm, to: 1500 nm, step: 10 nm}"),
         "to: |1500 nm", "band.to", ("from < to",)),
    # A channel plan that lists one wavelength twice (issue 7 item 7), also when written in other units.
    Case("duplicate-channel", edit("wavelength: 1310 nm", "channels: [1310 nm, 1550 nm, 1.31 um]"),
         "|1.31 um", "channels[2]", ("channel 1310 nm is listed twice", "also channels[0]")),
    Case("band-without-step", edit("wavelength: 1310 nm", "band: {from: 1500 nm, to: 1600 nm}"),
         "band: |{from", "band", ("missing required key 'step'",)),
    # PyYAML's reader rejects control characters before parsing; the position is still known.
    Case("control-character", edit("title: Minimal test link", "title: Minimal\x07 test link"),
         "title: Minimal|\x07", "(top level)", ("character",)),
    Case("empty-file", "", (1, 1), "(top level)", ("empty",)),
    Case("comment-only-file", "# a link will go here\n", (1, 1), "(top level)", ("empty",)),
    Case("not-utf8", MINIMAL_LINK.replace("Minimal test link", "Minimal test link \xe9").encode("latin-1"),
         (1, 26), "(top level)", ("UTF-8",)),
    Case("duplicate-key", edit("title: Minimal test link\n", "title: Minimal test link\ntitle: Second title\n"),
         "|title: Second", "title", ("duplicate key",)),
    Case("duplicate-segment-name", edit("name: panel", "name: trunk"),
         "  - name: |trunk\n    kind: connector", "chain[1].name", ("duplicate segment name 'trunk'", "chain[0]")),
    Case("connector-negative-loss", edit("loss: 0.5 dB", "loss: -0.5 dB"),
         "loss: |-0.5 dB", "chain[1].loss", ("joint loss must be from 0 dB to 60 dB",)),
    Case("splice-count-zero", append("  - kind: splice\n    loss: 0.1 dB\n    count: 0\n"),
         "count: |0", "chain[2].count", ("splice count must be from 1 to 10000",)),
    Case("splice-count-fraction", append("  - kind: splice\n    loss: 0.1 dB\n    count: 2.5\n"),
         "count: |2.5", "chain[2].count", ("expected a whole number", "2.5")),
    Case("overload-below-sensitivity", edit("  sensitivity: -30 dBm", "  sensitivity: -30 dBm\n  overload: -35 dBm"),
         "overload: |-35 dBm", "receiver.overload", ("overload must be above sensitivity",)),
    Case("medium-two-loss-forms", append(WINDOW + "    kappa: 1e-4\n    absorption: 1 /cm\n"),
         "absorption: |1 /cm", "chain[2].absorption", ("one of", "got kappa, absorption")),
    Case("missing-receiver", edit("receiver:\n  sensitivity: -30 dBm\n", ""),
         (1, 1), "(top level)", ("missing required key 'receiver'",)),
    Case("top-level-list", "- title: one\n- title: two\n", (1, 1), "(top level)", ("a link file is a mapping",)),
    # Deeper than PyYAML's recursive composer can go within Python's recursion limit.
    Case("deep-nesting", DEEP_NESTING, ANYWHERE, None, ("nest",)),
    # Written tags follow the same rules as plain scalars (issue 7 item 16).
    Case("bool-tag-on-yes", edit("loss: 0.5 dB", "loss: !!bool yes"),
         "loss: |!!bool", "chain[1].loss", ("'yes' cannot be read as !!bool",)),
    Case("int-tag-on-text", edit("loss: 0.5 dB", "loss: !!int ''"),
         "loss: |!!int", "chain[1].loss", ("cannot be read as !!int",)),
    Case("float-tag-on-text", edit("loss: 0.5 dB", "loss: !!float abc"),
         "loss: |!!float", "chain[1].loss", ("cannot be read as !!float",)),
    Case("unknown-tag-on-kind", edit("kind: connector", "kind: !part connector"),
         "kind: |!part", "chain[1].kind", ("unsupported YAML tag '!part'",)),
    Case("unknown-tag-on-material", append(WINDOW + "    material: !glass fused-silica\n"),
         "material: |!glass", "chain[2].material", ("unsupported YAML tag '!glass'",)),
    Case("map-tag-on-text", edit("loss: 0.5 dB", "loss: !!map 0.5 dB"),
         "loss: |!!map", "chain[1].loss", ("does not fit this scalar",)),
    # A recursive alias (issue 7 item 17).
    Case("recursive-alias", edit("chain:\n", "chain: &a\n  - *a\n"),
         "  - |*a", "(top level)", ("an alias is inside the list or mapping it names",)),
    # Integers beyond a float (issue 7 item 18).
    Case("count-beyond-float", append("  - kind: splice\n    loss: 0.1 dB\n    count: " + "9" * 400 + "\n"),
         "count: |999", "chain[2].count", ("got a 400-digit number",)),
    Case("number-beyond-float-digits", append(WINDOW + "    kappa: " + "9" * 400 + "\n"),
         "kappa: |999", "chain[2].kappa", ("out of range",)),
    Case("index-beyond-float-digits", append(WINDOW + "    index: " + "9" * 400 + "\n"),
         "index: |999", "chain[2].index", ("complex index",)),
    # YAML 1.1 implicit types are text where a count is expected (issue 16 item 5).
    *[Case(f"count-{label}", append(f"  - kind: splice\n    loss: 0.1 dB\n    count: {text}\n"),
           f"count: |{text}", "chain[2].count", ("expected a whole number", repr(text)))
      for label, text in (("base-60", "1:30"), ("hex", "0x10"), ("octal", "0o17"), ("leading-zero", "017"),
                          ("underscore", "1_000"), ("yes", "yes"))],
    # Long text is refused while reading, with the limit (issue 7 item 19).
    Case("name-too-long", edit("name: panel", "name: " + "x" * 1001),
         "name: |xxx", "(top level)", ("text longer than 1000 characters",)),
    # A key written twice is a duplicate even beside a merge key (issue 7 item 9).
    Case("duplicate-key-beside-merge", edit("  - name: panel\n", "  - &p\n    name: panel\n")
         + "  - <<: *p\n    name: panel 2\n    name: panel 3\n",
         "|name: panel 3", "chain[2].name", ("duplicate key",)),
    Case("merge-of-a-scalar", append("  - <<: 3\n    kind: element\n    loss: 1 dB\n"),
         "<<: |3", "chain[2]", ("merge key '<<' takes a mapping",)),
    # User text in a message is escaped: the message stays on its line (issue 7 item 21).
    Case("multi-line-duplicate-name", edit("name: trunk", 'name: "pa\\nPASS nel"').replace(
        "name: panel", 'name: "pa\\nPASS nel"'),
         '  - name: |"pa\\nPASS nel"\n    kind: connector', "chain[1].name",
         ("duplicate segment name 'pa\\nPASS nel'",)),
]


def written(case, tmp_path):
    """The case's link file, written under ``tmp_path``."""
    path = tmp_path / f"{case.id}.yaml"
    if isinstance(case.text, bytes):
        path.write_bytes(case.text)
    else:
        path.write_text(case.text.replace("{TMP}", str(tmp_path)), encoding="utf-8")
    return path


def problem_block(stderr, prefix):
    """The message starting with ``prefix`` and its hint lines."""
    start = stderr.index(prefix)
    lines = stderr[start:].splitlines()
    return "\n".join([lines[0], *_while_indented(lines[1:])])


def _while_indented(lines):
    for line in lines:
        if not line.startswith("  "):
            return
        yield line


def assert_placed(stderr, file, case, text):
    """``stderr`` holds ``FILE:LINE:COL: key.path: ...`` at the case's place, with its phrases."""
    if case.at == ANYWHERE:
        match = re.search(rf"^{re.escape(file)}:(\d+):(\d+): (.+?): ", stderr, re.M)
        assert match, f"no FILE:LINE:COL: in\n{stderr}"
        assert 1 <= int(match[1]) <= text.count("\n") + 1
        assert case.path is None, "a case placed anywhere names no key path"
        prefix = match[0]
    else:
        line, column = expected_mark(text, case.at)
        prefix = f"{file}:{line}:{column}: {case.path}: "
    assert prefix in stderr, f"expected {prefix!r} in\n{stderr}"
    block = problem_block(stderr, prefix)
    for phrase in case.phrases:
        assert phrase in block, f"expected {phrase!r} in\n{block}"


def case_text(case):
    return case.text.decode("latin-1") if isinstance(case.text, bytes) else case.text


@pytest.mark.parametrize("case", CASES, ids=[case.id for case in CASES])
def test_run_bad_input_exits_2_with_placed_message(case, tmp_path, cli):
    path = written(case, tmp_path)
    result = cli("run", path)
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert_placed(result.stderr, str(path), case, case_text(case))
    assert result.stdout == "", "an input error prints no budget"
    assert not (tmp_path / "marker").exists(), "a YAML tag ran a command"


@pytest.mark.parametrize("case", CASES, ids=[case.id for case in CASES])
def test_load_bad_input_raises_config_error_with_marks(case, tmp_path):
    path = written(case, tmp_path)
    with pytest.raises(linkbudget.ConfigError) as caught:
        linkbudget.load(path)
    problems = caught.value.problems
    assert problems and all(problem.file == str(path) for problem in problems)
    assert all(problem.mark is not None for problem in problems), str(caught.value)
    if case.at == ANYWHERE:
        return
    line, column = expected_mark(case_text(case), case.at)
    placed = [(p.mark.line, p.mark.column, format_key_path(p.path)) for p in problems]
    assert (line, column, case.path) in placed


def test_load_text_bad_input_names_the_string(minimal_link):
    text = minimal_link.replace("length: 2 km", "length: 2000")
    with pytest.raises(linkbudget.ConfigError) as caught:
        linkbudget.load(text)
    (problem,) = caught.value.problems
    assert (problem.file, problem.mark.line, problem.mark.column) == ("<string>", 10, 13)
    assert problem.path == ("chain", 0, "length")
    assert str(caught.value).startswith("<string>:10:13: chain[0].length: missing unit")


def test_load_collects_every_problem_of_a_file(minimal_link):
    text = minimal_link.replace("length: 2 km", "length: -2 km").replace("loss: 0.5 dB", "loss: 0.5 parsec")
    with pytest.raises(linkbudget.ConfigError) as caught:
        linkbudget.load(text)
    paths = [format_key_path(problem.path) for problem in caught.value.problems]
    assert paths == ["chain[0].length", "chain[1].loss"]


@pytest.mark.parametrize(("old", "new", "key"), [("length: 2 km", "lenght: 2 km", "length"),
                                                ("    attenuation:", "    attenuaton:", "attenuation")])
def test_misspelt_required_key_is_not_also_reported_missing(minimal_link, old, new, key):
    with pytest.raises(linkbudget.ConfigError) as caught:
        linkbudget.load(minimal_link.replace(old, new))
    (problem,) = caught.value.problems
    assert problem.hint == f"did you mean '{key}'?"
    assert "missing" not in str(caught.value)


def test_run_missing_file_exits_2(tmp_path, cli):
    path = tmp_path / "no-such-link.yaml"
    result = cli("run", path)
    assert result.exit_code == 2
    assert "Traceback" not in result.output
    assert result.stderr.startswith(f"{path}: ")
    assert "file not found" in result.stderr


def test_run_directory_exits_2(tmp_path, cli):
    result = cli("run", tmp_path)
    assert result.exit_code == 2
    assert "Traceback" not in result.output
    assert result.stderr.startswith(f"{tmp_path}: ")
    assert "is a directory" in result.stderr


def test_load_missing_file_raises_config_error(tmp_path):
    with pytest.raises(linkbudget.ConfigError, match="file not found"):
        linkbudget.load(tmp_path / "no-such-link.yaml")


def test_check_good_and_bad_exits_2_and_reports_both(tmp_path, cli, minimal_link):
    good = tmp_path / "good.yaml"
    good.write_text(minimal_link, encoding="utf-8")
    bad = tmp_path / "bad.yaml"
    bad.write_text(minimal_link.replace("length: 2 km", "length: 2000"), encoding="utf-8")
    result = cli("check", good, bad)
    assert result.exit_code == 2
    assert "Traceback" not in result.output
    lines = result.stdout.splitlines()
    (good_line,) = [line for line in lines if f"{good}:" in line]
    assert good_line.startswith("PASS") and "+28.50 dB" in good_line
    (bad_line,) = [line for line in lines if f"{bad}:" in line]
    assert bad_line.startswith("ERROR") and "input error" in bad_line
    assert lines[-1] == "2 link(s): 1 close, 0 do not close, 1 with input errors"
    assert f"{bad}:10:13: chain[0].length: missing unit" in result.stderr
