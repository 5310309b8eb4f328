"""The one escaping rule for user text in every output (expected strings written out by hand)."""

import pytest

from linkbudget.text import escaped


@pytest.mark.parametrize(
    ("raw", "shown"),
    [
        ("patch panel", "patch panel"),
        ("Übergabe → Ø 3 mm", "Übergabe → Ø 3 mm"),
        ("a\nPASS b", "a\\nPASS b"),
        ("\x1b[32mPASS\x1b[0m", "\\x1b[32mPASS\\x1b[0m"),
        ("tab\there", "tab\\there"),
        ("right-to-left \u202e override", "right-to-left \\u202e override"),
        ("back\\slash", "back\\\\slash"),
        ("\x7f", "\\x7f"),
    ],
)
def test_escaped_shows_one_printable_line(raw, shown):
    assert escaped(raw) == shown
    assert escaped(raw).isprintable()
