"""The blocks a report (or a command's output) is made of: pure data.

A :class:`Table` is rows of raw values (numbers stay numbers, SI or the
display units its columns name) with :class:`Column` definitions (name,
heading words or trade symbol, unit, how many digits); the renderers in
:mod:`latdyn.report.render` only format them.  A :class:`Figure` is a
specification (which plot, of what), drawn only when the report is written.
No matplotlib and no files here.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

__all__ = ["Absent", "Column", "Table", "Heading", "Paragraph", "Notice", "Figure", "Report"]


@dataclass(frozen=True)
class Absent:
    """A cell without a number, and why: shown as the reason, empty in CSV, null in JSON.

    Examples
    --------
    >>> Absent("convergent").reason
    'convergent'
    """

    reason: str = "-"


@dataclass(frozen=True)
class Column:
    """One column of a table.

    Parameters
    ----------
    key : str
        Machine name (the report's CSV header, the JSON key).
    title : str
        Heading words or trade symbol (``"Mode"``, ``"omega_n"``).
    unit : str, optional
        Unit shown in brackets after the title (``"rad/s"``, ``"-"``, ``"%"``).
    symbol : str, optional
        Trade symbol when the title is words (for glossaries and JSON).
    digits : int
        Digits shown (significant, or decimals for ``style="fixed"``).
    style : {"significant", "general", "fixed"}
        See :func:`latdyn.display.format_number`.
    signed : bool
        Show a ``+`` on positive numbers (margins, changes).
    words : tuple of (value, text), optional
        Display words of particular raw values (``((True, "<< worst"), (False, ""))``).

    Examples
    --------
    >>> Column("natural_frequency", "omega_n", "rad/s").heading
    'omega_n [rad/s]'
    """

    key: str
    title: str
    unit: str | None = None
    symbol: str | None = None
    digits: int = 4
    style: str = "significant"
    signed: bool = False
    words: tuple = ()

    @property
    def heading(self) -> str:
        """Title with the unit in brackets."""
        return f"{self.title} [{self.unit}]" if self.unit else self.title

    def as_dict(self) -> dict:
        return {"key": self.key, "title": self.title, "symbol": self.symbol, "unit": self.unit}


@dataclass(frozen=True)
class Table:
    """A table: raw values by column key, formatted only by the renderers.

    Parameters
    ----------
    name : str
        File name without suffix (``tables/<name>.csv`` in a report).
    caption : str
    columns : tuple of Column
    rows : tuple of dict
        ``{column key: raw value}``: float, int, str, bool, complex, a tuple
        of roots, :class:`Absent` or None (does not apply).
    emphasis : tuple of int
        Row indices to highlight (a level below Level 1, a divergent mode).
    """

    name: str
    caption: str
    columns: tuple
    rows: tuple
    emphasis: tuple = ()

    def column(self, key) -> Column:
        return next(c for c in self.columns if c.key == key)

    def select(self, keys, name=None, caption=None) -> Table:
        """A view: the same rows showing only the columns ``keys``, in that order.

        An item ``(shown_key, source_key)`` shows the column ``source_key``
        under the key ``shown_key`` (for a public CSV layout whose name
        differs from the table's).

        Examples
        --------
        >>> t = Table("t", "T", (Column("a", "A"), Column("b", "B")), ({"a": 1, "b": 2},))
        >>> [c.key for c in t.select(["b"]).columns], t.select([("x", "a")]).rows
        (['b'], ({'x': 1},))
        """
        pairs = [(k, k) if isinstance(k, str) else tuple(k) for k in keys]
        columns = tuple(replace(self.column(source), key=shown) for shown, source in pairs)
        rows = self.rows
        if any(shown != source for shown, source in pairs):
            rows = tuple({shown: row.get(source) for shown, source in pairs} for row in rows)
        return replace(self, columns=columns, rows=rows, name=name or self.name,
                       caption=self.caption if caption is None else caption)

    def values(self, key) -> list:
        """The raw values of one column."""
        return [row.get(key) for row in self.rows]


@dataclass(frozen=True)
class Heading:
    level: int
    text: str
    anchor: str = ""


@dataclass(frozen=True)
class Paragraph:
    text: str
    style: str = ""  # "", "small", "warning"


@dataclass(frozen=True)
class Notice:
    text: str


@dataclass(frozen=True)
class Figure:
    """A figure to draw: ``kind`` names the plot (see :mod:`latdyn.report.figures`),
    ``arguments`` its inputs (result objects); drawn and saved as
    ``figures/<name>.png`` and ``.svg`` when the report is written."""

    name: str
    caption: str
    kind: str = ""
    arguments: dict = field(default_factory=dict, compare=False)


@dataclass
class Report:
    """The blocks of a report and its machine-readable results (``results.json``)."""

    title: str
    blocks: list = field(default_factory=list)
    results: dict = field(default_factory=dict)
    generated: str = ""
    document: dict = field(default_factory=dict)

    def add(self, *blocks):
        """Append blocks; a table's or figure's name is made a safe file name (ASCII letters,
        digits and dashes, length-limited: :func:`latdyn.text.file_name`) and numbered where
        another of its kind has it already (``tables/<name>.csv``, ``figures/<name>.png``).

        Examples
        --------
        >>> report = Report("r")
        >>> report.add(Figure("a/../b", ""), Figure("A-B", ""), Table("a-b", "", (), ()))
        >>> [block.name for block in report.blocks]
        ['a-b', 'a-b-2', 'a-b']
        """
        from latdyn.text import file_name, numbered

        for block in blocks:
            if isinstance(block, (Table, Figure)):
                used = {b.name.lower() for b in self.blocks if type(b) is type(block)}
                block = replace(block, name=numbered(file_name(block.name), used))
            self.blocks.append(block)

    @property
    def tables(self) -> list:
        return [b for b in self.blocks if isinstance(b, Table)]

    @property
    def figures(self) -> list:
        return [b for b in self.blocks if isinstance(b, Figure)]
