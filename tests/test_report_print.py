"""Printed report pages (issue 13, item 3): related tables kept together where they fit, a short
table kept whole with its caption and notes, a long one breaking between rows with its heading row
repeated, figures small enough to share a page.  Checked on the HTML structure and the print
style (common practice of CSS paged media: ``break-inside: avoid``, CSS Fragmentation Module
Level 3, with the older ``page-break-inside`` beside it)."""

import re
from html.parser import HTMLParser

import pytest

from latdyn.report.blocks import Column, Heading, Paragraph, Report, Table
from latdyn.report.render import KEEP_ROWS, css, render_html


class Tree(HTMLParser):
    """Elements as (tag, classes, parent index)."""

    VOID = {"meta", "img", "br", "link"}

    def __init__(self, text):
        super().__init__()
        self.elements, self.stack, self.text = [], [], {}
        self.feed(text)

    def handle_starttag(self, tag, attrs):
        classes = set((dict(attrs).get("class") or "").split())
        self.elements.append((tag, classes, self.stack[-1] if self.stack else None))
        if tag not in self.VOID:
            self.stack.append(len(self.elements) - 1)

    def handle_endtag(self, tag):
        if tag not in self.VOID:
            self.stack.pop()

    def handle_data(self, data):
        if self.stack and data.strip():
            self.text.setdefault(self.stack[-1], "")
            self.text[self.stack[-1]] += data

    def ancestors(self, index):
        parent = self.elements[index][2]
        while parent is not None:
            yield parent
            parent = self.elements[parent][2]

    def find(self, tag, text=None):
        return [i for i, (t, _, _) in enumerate(self.elements)
                if t == tag and (text is None or text in self.text.get(i, ""))]


def table(name, rows):
    return Table(name, f"caption of {name}", (Column("a", "A"),), tuple({"a": k} for k in range(rows)))


@pytest.fixture
def page(tmp_path):
    report = Report("Print test", document={"number": "P-1"})
    report.add(Heading(2, "Section", "section"),
               table("first", 3), Paragraph("note on first", "small"), table("second", 4),
               Paragraph("a paragraph of the text", ""),
               table("long", KEEP_ROWS + 20), Paragraph("note on long", "small"),
               Heading(3, "Run too long to keep", "run"),
               table("third", KEEP_ROWS - 2), table("fourth", KEEP_ROWS - 2))
    (tmp_path / "figures").mkdir()
    return Tree(render_html(report, str(tmp_path)))


def test_a_table_of_long_rows_counts_its_wrapped_lines(tmp_path):
    """Four rows with a source of 300 characters print as some 25 lines: not kept whole."""
    wordy = Table("wordy", "caption of wordy", (Column("a", "A"), Column("source", "Source")),
                  tuple({"a": k, "source": "x " * 150} for k in range(4)))
    report = Report("Print test")
    report.add(wordy, table("short", 4))
    (tmp_path / "figures").mkdir()
    tree = Tree(render_html(report, str(tmp_path)))
    own, group, _ = block_of(tree, "caption of wordy")
    assert own == {"table", "long"} and group == {"tables"}
    assert block_of(tree, "caption of short")[0] == {"table", "keep"}


def block_of(tree, caption):
    """The div.table holding the table with this caption, and the div.tables around it."""
    index = tree.find("caption", caption)[0]
    divs = [a for a in tree.ancestors(index) if tree.elements[a][0] == "div"]
    return tree.elements[divs[0]][1], tree.elements[divs[1]][1], divs


@pytest.mark.parametrize("caption,own,run", [
    ("caption of first", {"table", "keep"}, {"tables", "keep"}),
    ("caption of second", {"table", "keep"}, {"tables", "keep"}),
    ("caption of long", {"table", "long"}, {"tables"}),
    ("caption of third", {"table", "keep"}, {"tables"}),
], ids=["short-run-first", "short-run-second", "long-table", "run-too-long"])
def test_tables_are_grouped_for_print(page, caption, own, run):
    mine, group, _ = block_of(page, caption)
    assert mine == own and group == run


def test_related_tables_share_one_group_and_notes_stay_with_their_table(page):
    _, _, first = block_of(page, "caption of first")
    _, _, second = block_of(page, "caption of second")
    assert first[1] == second[1] and first[0] != second[0]
    note = page.find("p", "note on first")[0]
    assert first[0] in page.ancestors(note)
    _, _, long = block_of(page, "caption of long")
    assert long[1] != first[1]  # the text paragraph between ends the run
    assert long[0] in page.ancestors(page.find("p", "note on long")[0])
    text = page.find("p", "a paragraph of the text")[0]
    assert not any(page.elements[a][0] == "div" for a in page.ancestors(text))
    _, _, third = block_of(page, "caption of third")
    _, _, fourth = block_of(page, "caption of fourth")
    assert third[1] == fourth[1]


def print_rules():
    """{selector: declarations} of the print style's @media print block."""
    sheet = css()
    start = sheet.index("@media print")
    body = sheet[sheet.index("{", start) + 1:]
    body = re.sub(r"/\*.*?\*/", "", body, flags=re.S)
    rules = {}
    for selectors, declarations in re.findall(r"([^{}]+)\{([^{}]*)\}", body):
        for selector in selectors.split(","):
            rules.setdefault(selector.strip(), "")
            rules[selector.strip()] += declarations
    return rules


@pytest.mark.parametrize("selector,declaration", [
    ("div.table.keep", "break-inside: avoid"), ("div.table.keep", "page-break-inside: avoid"),
    ("div.tables.keep", "break-inside: avoid"), ("div.table.long caption", "break-after: avoid"),
    ("thead", "display: table-header-group"), ("tr", "break-inside: avoid"),
    ("h2", "break-after: avoid"), ("h3 + p", "break-after: avoid"), ("p", "orphans: 3"),
], ids=lambda value: value.replace(" ", "_"))
def test_print_style_keeps_blocks_together(selector, declaration):
    assert declaration in print_rules()[selector]


def test_a_figure_leaves_room_on_its_page():
    """A4 landscape with 12 mm margins leaves 186 mm of height: a figure of at most 118 mm leaves
    room for a table's first rows or a short table beside it on the page."""
    height = float(re.search(r"max-height:\s*([\d.]+)mm", print_rules()["figure img"]).group(1))
    assert height <= 0.65 * (210 - 2 * 12)
