"""Text for people: user text made safe to print (one escaping rule for every output format and
every message), and lengths in the unit that reads best (:func:`length_text`).

Names, titles and notes come from link files that anyone who can open a pull request may write.
Printed raw, a line break or an ANSI escape sequence in a name could forge a ``PASS`` line in a CI
log or move the cursor over the verdict. :func:`escaped` shows every character that is not plainly
printable as a Python-style escape (``\\n``, ``\\x1b``, ``\\u202e``), so what is printed is exactly
one line of visible characters.
"""

import numpy as np

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


def length_text(length_m):
    """A length in the unit that reads best: nm below 10 µm, µm below 10 mm, else mm or m."""
    for unit, factor, below in (("nm", 1e-9, 1e-5), ("µm", 1e-6, 1e-2), ("mm", 1e-3, 1.0)):
        if length_m < below:
            return f"{length_m / factor:.6g} {unit}"
    return f"{length_m:.6g} m"


#: Resolution of every printed and JSON wavelength [nm]: values closer than this print alike.
WAVELENGTH_RESOLUTION_NM = 1e-6


def _nm_label(wavelength_nm):
    text = f"{round(float(wavelength_nm), 6):.6f}".rstrip("0").rstrip(".")
    return "0" if text == "-0" else text


def wavelength_text(wavelength_m):
    """Wavelengths [m] as nm text with the fewest digits that state each exactly to
    :data:`WAVELENGTH_RESOLUTION_NM` (``1550``, ``1550.116``, ``1550.002``): every digit the user
    wrote (to 1e-6 nm), so neighbours on an axis never print alike. A list for an array."""
    values_nm = np.asarray(wavelength_m, dtype=float) * 1e9
    if values_nm.ndim == 0:
        return _nm_label(values_nm)
    return [_nm_label(value) for value in values_nm]


def nm(wavelength_m):
    """One wavelength [m] as ``"1550.116 nm"`` (see :func:`wavelength_text`)."""
    return f"{wavelength_text(wavelength_m)} nm"
