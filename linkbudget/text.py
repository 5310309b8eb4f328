"""User text made safe to print: one escaping rule for every output format and every message.

Names, titles and notes come from link files that anyone who can open a pull request may write.
Printed raw, a line break or an ANSI escape sequence in a name could forge a ``PASS`` line in a CI
log or move the cursor over the verdict. :func:`escaped` shows every character that is not plainly
printable as a Python-style escape (``\\n``, ``\\x1b``, ``\\u202e``), so what is printed is exactly
one line of visible characters.
"""

#: Characters shown as a short escape rather than a code point.
_SHORT_ESCAPES = {"\n": "\\n", "\r": "\\r", "\t": "\\t", "\\": "\\\\"}


def _escaped_char(char):
    if char in _SHORT_ESCAPES:
        return _SHORT_ESCAPES[char]
    if char.isprintable() or char == " ":
        return char
    code = ord(char)
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}"


def escaped(text):
    """``text`` on one line of printable characters; control and format characters escaped.

    Backslashes are doubled so an escape written by the user cannot pass for one made here.
    Plain text (letters of any script, digits, punctuation, spaces) is returned unchanged.
    """
    text = str(text)
    if text.isprintable() and "\\" not in text:
        return text
    return "".join(_escaped_char(char) for char in text)
