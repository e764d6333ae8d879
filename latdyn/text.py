"""Names from input files are data: safe file names and text escaped for each place it goes.

An aircraft, condition or criteria-set name is free text from a file.  It
never becomes a path (:func:`slug`, :func:`file_name`, :func:`numbered`: ASCII
letters, digits and dashes, length-limited, collisions numbered) and never
markup: control characters are shown escaped on a terminal
(:func:`printable`), a spreadsheet cell cannot start a formula
(:func:`spreadsheet_cell`) and matplotlib draws it as plain text, never
mathtext (:func:`plain`); in a TOML file latdyn writes it is a valid string
(:func:`toml_string`) or comment (:func:`toml_comment`), never a key.  HTML and Markdown escaping live with their
renderers (:mod:`latdyn.report.render`).
"""

from __future__ import annotations

import re
import unicodedata

__all__ = ["SLUG_LIMIT", "NAME_LIMIT", "FORMULA_STARTS", "slug", "file_name", "numbered", "printable", "spreadsheet_cell",
           "plain", "toml_string", "toml_comment"]

#: Longest slug of one name [characters].
SLUG_LIMIT = 40
#: Longest file name built from names, without its suffix [characters] (file systems allow 255 bytes).
NAME_LIMIT = 120

_NOT_SLUG = re.compile(r"[^a-z0-9]+")


def slug(text, limit=SLUG_LIMIT, default="item") -> str:
    """A file-name-safe form of a name: lower-case ASCII letters, digits and single dashes.

    Accents are dropped (``é`` -> ``e``), every other run of characters
    becomes one dash, and the result is cut to ``limit`` characters; a name
    with nothing left (``"../"``, ``"$$"``) gives ``default``.

    Examples
    --------
    >>> slug("Kestrel K-40 / cruise"), slug("../../escape"), slug("Tōhoku $\\\\frac{"), slug("..")
    ('kestrel-k-40-cruise', 'escape', 'tohoku-frac', 'item')
    >>> len(slug("x" * 300))
    40
    """
    ascii_text = unicodedata.normalize("NFKD", str(text)).encode("ascii", "ignore").decode("ascii")
    out = _NOT_SLUG.sub("-", ascii_text.lower()).strip("-")
    out = out[:limit].rstrip("-")
    return out or default


def file_name(*parts, limit=NAME_LIMIT) -> str:
    """A file name (without suffix) from names and fixed words: each part a :func:`slug`, joined
    by dashes, cut to ``limit`` characters.

    Examples
    --------
    >>> file_name("Kestrel K-40", "approach/../x", "dutch-roll", "MIL-F-8785C")
    'kestrel-k-40-approach-x-dutch-roll-mil-f-8785c'
    """
    joined = "-".join(slug(part, limit) for part in parts)
    return joined[:limit].rstrip("-") or "item"


def numbered(name, used, limit=NAME_LIMIT) -> str:
    """``name``, or ``name-2``, ``name-3``, ... when taken: the first not in ``used``.

    ``used`` holds the names taken so far (compared without regard to case,
    as some file systems do); the name returned is added to it.

    Examples
    --------
    >>> used = set()
    >>> [numbered(n, used) for n in ("cruise", "cruise", "Cruise", "cruise-2")]
    ['cruise', 'cruise-2', 'Cruise-3', 'cruise-2-2']
    """
    candidate, number = name, 1
    while candidate.lower() in used:
        number += 1
        tail = f"-{number}"
        candidate = name[:limit - len(tail)].rstrip("-") + tail
    used.add(candidate.lower())
    return candidate


def printable(text, keep="") -> str:
    r"""Text with its control and other unprintable characters shown escaped (``\n``, ``\x1b``,
    ``\u202e``): one line on a terminal, no escape sequence reaching it.

    Parameters
    ----------
    text : str
    keep : str
        Characters left as they are (``"\n"``: line breaks of a paragraph).

    Examples
    --------
    >>> print(printable("a\x1b[31mred\nb\x00"))
    a\x1b[31mred\nb\x00
    >>> printable("Zürich ±"), printable("a\nb", keep="\n")
    ('Zürich ±', 'a\nb')
    """
    text = str(text)
    if text.isprintable():
        return text
    return "".join(c if c.isprintable() or c == " " or c in keep else _escape(c) for c in text)


def _escape(character):
    code = ord(character)
    named = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}.get(character)
    if named:
        return named
    if code < 0x100:
        return f"\\x{code:02x}"
    return f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}"


#: First characters that make a spreadsheet read a cell as a formula (or a field separator).
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?")


def spreadsheet_cell(text) -> str:
    """A text cell that a spreadsheet shows as text: one starting with ``= + - @``, a tab or a
    carriage return gets a leading apostrophe, unless it is a plain number (``-0.62``, as a
    file gave it) or a lone dash (nothing to show).  For text cells only: numbers stay numbers.

    Examples
    --------
    >>> spreadsheet_cell("=HYPERLINK(1)"), spreadsheet_cell("-1+2"), spreadsheet_cell("cruise")
    ("'=HYPERLINK(1)", "'-1+2", 'cruise')
    >>> spreadsheet_cell("-0.62"), spreadsheet_cell("-"), spreadsheet_cell("")
    ('-0.62', '-', '')
    """
    text = str(text)
    if not text.startswith(FORMULA_STARTS) or text in ("-", "+") or _NUMBER.fullmatch(text):
        return text
    return "'" + text


def plain(text) -> str:
    r"""A name for a matplotlib text artist, drawn as written: dollar signs escaped (no mathtext)
    and control characters other than line breaks shown escaped (no missing glyphs).

    Examples
    --------
    >>> print(plain("$\\frac{$ a\x00"))
    \$\frac{\$ a\x00
    """
    return printable(text, keep="\n").replace("$", r"\$")


_TOML_NAMED = {'"': '\\"', "\\": "\\\\", "\b": "\\b", "\t": "\\t", "\n": "\\n", "\f": "\\f", "\r": "\\r"}


def toml_string(text) -> str:
    r"""A TOML basic string that reads back as ``text``: the quote, the backslash and every control
    character escaped (TOML 1.0.0, "String": U+0000 to U+001F and U+007F may not stand raw), every
    other character written as it is (the file is UTF-8).  A name holding a quote or a line break
    cannot end the string and add keys; a lone surrogate (not text UTF-8 can hold) becomes U+FFFD.

    Examples
    --------
    >>> print(toml_string('a "b"\n[evil]\x7f Zürich'))
    "a \"b\"\n[evil]\u007f Zürich"
    >>> import tomllib
    >>> tomllib.loads("name = " + toml_string('x\\" = 1\n\x00😀'))["name"] == 'x\\" = 1\n\x00😀'
    True
    """
    out = []
    for character in str(text):
        code = ord(character)
        if character in _TOML_NAMED:
            out.append(_TOML_NAMED[character])
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04x}")
        elif 0xD800 <= code <= 0xDFFF:
            out.append("\ufffd")
        else:
            out.append(character)
    return '"' + "".join(out) + '"'


def toml_comment(text) -> str:
    r"""Text for a TOML comment: on one line, control characters shown escaped (:func:`printable`;
    TOML allows none but the tab in a comment), so a name cannot end the comment and add keys.

    Examples
    --------
    >>> toml_comment("Kestrel\n[evil]\nk = 1\x7f")
    'Kestrel\\n[evil]\\nk = 1\\x7f'
    """
    return printable(text).encode("utf-8", "backslashreplace").decode("utf-8")
