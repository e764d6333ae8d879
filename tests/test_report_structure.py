"""The report package's seams: content without matplotlib, Markdown that parses as written,
one definition per table, matplotlib's global state left alone, and the import layering."""

import ast
import copy
import json
import os
import pathlib
import subprocess
import sys
import textwrap

import pytest

from latdyn.report.blocks import Absent, Column, Table
from latdyn.report.render import cell_text, escape_markdown, render_csv, render_markdown_table, table_records
from test_report import SMALL  # one invented condition

ROOT = pathlib.Path(__file__).resolve().parent.parent
PACKAGE = ROOT / "latdyn"
DEMO = [str(ROOT / "aircraft" / name) for name in ("kestrel-k40.toml",)]
VARIANTS = [str(ROOT / "aircraft" / name) for name in ("kestrel-k40-tall-fin.toml", "kestrel-k40-tip-tanks.toml")]


def _python(code):
    result = subprocess.run([sys.executable, "-c", textwrap.dedent(code)], capture_output=True, text=True,
                            cwd=ROOT, env={**os.environ, "MPLBACKEND": ""}, timeout=300)
    assert result.returncode == 0, result.stderr
    return result.stdout


def test_report_content_is_built_without_matplotlib():
    """The content stage (analysis and blocks) imports no matplotlib and writes nothing; the blocks
    carry every table and figure specification of the demo report."""
    out = _python(f"""
        import json, sys
        from latdyn.report import analyse_report, report_content
        data = analyse_report({DEMO!r}, {VARIANTS!r})
        report = report_content(data)
        tables = [t.name for t in report.tables]
        figures = [(f.name, f.kind) for f in report.figures]
        modes = next(t for t in report.tables if t.name == "kestrel-k40-cruise-modes")
        print(json.dumps({{"matplotlib": sorted(m for m in sys.modules if m.startswith("matplotlib")),
                          "tables": tables, "figures": figures,
                          "status": modes.values("status"), "emphasis": list(modes.emphasis)}}))
    """)
    found = json.loads(out)
    assert found["matplotlib"] == []
    assert "summary" in found["tables"] and "kestrel-k40-cruise-assessment" in found["tables"]
    assert "roll-response" in found["tables"]
    # the demo report's CSV files (roll-response indicators and the mass and geometry as given included),
    # and per condition the three steady-flight tables with the static checks of MIL-F-8785C 3.3.6
    # (3.3.7.1 in the Category C approach only)
    assert len(found["tables"]) == 30 + 3 * 3 + 3 + 1
    assert ["kestrel-k40-s-plane", "s_plane"] in found["figures"]
    # PNG and SVG files: a roll-performance figure and a steady figure per condition
    assert len(found["figures"]) == 14 + 3
    # the demo's spiral diverges slowly: the one row marked, in the report's words
    assert found["status"] == ["stable", "stable", "DIVERGENT"] and found["emphasis"] == [2]


@pytest.mark.parametrize("backend", ["svg", "pdf"])
def test_write_report_leaves_the_matplotlib_backend_alone(tmp_path, backend):
    """A notebook user's backend (here one chosen explicitly) is unchanged, and pyplot is not
    imported, after writing a report."""
    (tmp_path / "a.toml").write_text(SMALL)
    out = _python(f"""
        import sys, matplotlib
        matplotlib.use({backend!r})
        before = matplotlib.get_backend()
        from latdyn.report import write_report
        write_report([{str(tmp_path / "a.toml")!r}], {str(tmp_path / "r")!r}, progress=False)
        print(before, matplotlib.get_backend(), "matplotlib.pyplot" in sys.modules)
    """)
    assert out.split() == [backend, backend, "False"]
    assert len(list((tmp_path / "r" / "figures").glob("*.png"))) == 5 + 1     # and the steady figure


@pytest.fixture(scope="module")
def demo_report(tmp_path_factory):
    from latdyn.report import write_report

    folder = tmp_path_factory.mktemp("demo") / "demo"
    write_report(DEMO, str(folder), VARIANTS, progress=False)
    return folder


def _inline_text(token):
    """Plain text of an inline token's children (escapes resolved)."""
    return "".join(child.content for child in token.children or () if child.type in ("text", "code_inline"))


def test_report_markdown_tables_are_recognised(demo_report):
    """Every table of report.md parses as a table in CommonMark with the GFM table rule
    (markdown-it-py), with the headings as written (|phi/beta| no longer breaks the mode table)."""
    from markdown_it import MarkdownIt

    from latdyn.report import build_report

    text = (demo_report / "report.md").read_text(encoding="utf-8")
    tokens = MarkdownIt("commonmark").enable("table").parse(text)
    report = build_report(DEMO, VARIANTS)
    assert sum(t.type == "table_open" for t in tokens) == len(report.tables) == 30 + 3 * 3 + 3 + 1
    headings = []
    for i, token in enumerate(tokens):
        if token.type == "th_open":
            headings.append(_inline_text(tokens[i + 1]))
    expected = [c.heading for table in report.tables for c in table.columns]
    assert headings == expected
    assert "|phi/beta| [-]" in headings and "zeta_d*omega_nd [rad/s]" not in headings
    # cells come back as the renderer's text: a sign, a dash and the neutral word survive
    cells = [_inline_text(tokens[i + 1]) for i, t in enumerate(tokens) if t.type == "td_open"]
    # (the worst rows of the demo are now roll-performance rows; the asterisk survives in the test below)
    assert "DIVERGENT" in cells and "t to 30 deg [s]" in cells


@pytest.mark.parametrize("text", ["|phi/beta| [-]", "zeta_d*omega_nd [rad/s]", "# not a heading",
                                  "1. not a list", "<b>x</b> & &amp; [link](http://x)", "_a_ __b__ `c` ~~d~~",
                                  "- dash", "---", "a\\b"],
                         ids=["pipes", "star", "hash", "ordered", "html", "emphasis", "bullet", "rule",
                              "backslash"])
def test_escaped_markdown_reads_as_written(text):
    """A paragraph and a table cell of escaped text render to exactly that text (CommonMark,
    markdown-it-py)."""
    from markdown_it import MarkdownIt

    parser = MarkdownIt("commonmark").enable(["table", "strikethrough"])
    paragraph = parser.parse(escape_markdown(text))
    assert [t.type for t in paragraph][:1] == ["paragraph_open"]
    assert _inline_text(paragraph[1]) == text
    table = Table("t", "T", (Column("x", text),), ({"x": text},))
    tokens = parser.parse(render_markdown_table(table))
    assert [_inline_text(tokens[i + 1]) for i, t in enumerate(tokens) if t.type in ("th_open", "td_open")] \
        == [text, text]


def test_one_table_feeds_every_renderer():
    """Renderers only format the raw values of one table: text, CSV (raw and display), JSON."""
    from latdyn.report.render import render

    table = Table("t", "T", (Column("mode", "Mode"), Column("margin", "Margin", signed=True),
                             Column("value", "Value"), Column("worst", "Worst", words=((True, "<<"),))),
                  ({"mode": "Spiral", "margin": 0.0038, "value": Absent("convergent"), "worst": True},
                   {"mode": "Dutch roll", "margin": -1.25, "value": 27.744894303, "worst": False}))
    assert render(table).splitlines()[2].split() == ["Spiral", "+0.003800", "convergent", "<<"]
    assert render_csv(table).splitlines()[1:] == ["Spiral,0.0038,,true", "Dutch roll,-1.25,27.744894303,false"]
    assert render(table, "csv").splitlines()[2] == "Dutch roll,-1.250,27.74,no"
    assert table_records(table)["rows"][0] == {"mode": "Spiral", "margin": 0.0038, "value": None, "worst": True}
    assert cell_text(None) == "-"


def test_neutral_mode_reads_the_same_in_terminal_and_report():
    """A neutral (zero) spiral root reads "neutral" in the mode table wherever it is shown."""
    import numpy as np

    from latdyn.modes import modes_from_matrix
    from latdyn.report.render import render, render_html_table
    from latdyn.report.tables import MODE_REPORT_VIEW, MODE_TEXT_VIEW, mode_table

    # no gravity coupling: the phi column is zero, so the spiral root is exactly zero (common practice)
    A = np.array([[-0.1113, 0.0, -1.0, 0.0], [-1.328, -0.951, 0.609, 0.0],
                  [0.757, -0.124, -0.265, 0.0], [0.0, 1.0, 0.0, 0.0]])
    table = mode_table(modes_from_matrix(A))
    terminal = render(table.select(MODE_TEXT_VIEW))
    html = render_html_table(table.select(MODE_REPORT_VIEW))
    assert "neutral" in terminal and "neutral" in html and "NEUTRAL" not in terminal + html
    assert render_csv(table.select(MODE_REPORT_VIEW)).count(",neutral") == 1


# ------------------------------------------------------------------ layering contract

LIBRARY_FORBIDDEN = ("latdyn.report", "latdyn.commands", "latdyn.cli")
ENTRY_POINTS = ("latdyn.__main__",)  # ``python -m latdyn``: the command line itself
CONTENT_MODULES = ("latdyn.report.blocks", "latdyn.report.tables", "latdyn.report.analysis",
                   "latdyn.report.content", "latdyn.report.render")


def _modules():
    for path in sorted(PACKAGE.rglob("*.py")):
        name = ".".join(path.relative_to(ROOT).with_suffix("").parts)
        yield name.removesuffix(".__init__"), ast.parse(path.read_text(encoding="utf-8"))


#: The one door from the library into the report layer: a result object's notebook display
#: (``_repr_html_``) may import the module that renders it with the report's own tables.
DISPLAY_HOOK, DISPLAY_MODULE = "_repr_html_", "latdyn.report.notebook"


def _without_display_hooks(tree):
    """The tree less the bodies of ``_repr_html_`` methods that import only DISPLAY_MODULE."""
    class Strip(ast.NodeTransformer):
        def visit_FunctionDef(self, node):
            if node.name == DISPLAY_HOOK and all(
                    isinstance(n, ast.ImportFrom) and n.module == DISPLAY_MODULE
                    for n in ast.walk(node) if isinstance(n, (ast.Import, ast.ImportFrom))):
                return None
            return self.generic_visit(node)

    return Strip().visit(copy.deepcopy(tree))


def _imports(tree):
    """Every module a file imports, at the top or inside functions."""
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            found.add(node.module)
            found.update(f"{node.module}.{alias.name}" for alias in node.names)
    return found


def _under(name, prefixes):
    return any(name == p or name.startswith(p + ".") for p in prefixes)


def test_layering_contract():
    """Library modules never import the report, the commands or the CLI (but for the notebook
    display hooks, see DISPLAY_HOOK); the report never imports the commands; the report's content and rendering never import matplotlib or the
    plots (only latdyn.report.figures and .write draw)."""
    modules = dict(_modules())
    assert "latdyn.report.content" in modules and "latdyn.modes" in modules
    broken = []
    for name, tree in modules.items():
        imports = _imports(tree)
        if not _under(name, LIBRARY_FORBIDDEN + ENTRY_POINTS):
            outside_hooks = _imports(_without_display_hooks(tree))
            broken += [(name, i) for i in outside_hooks if _under(i, LIBRARY_FORBIDDEN)]
        elif _under(name, ("latdyn.report",)):
            broken += [(name, i) for i in imports if _under(i, ("latdyn.commands", "latdyn.cli"))]
        if name in CONTENT_MODULES:
            broken += [(name, i) for i in imports if _under(i, ("matplotlib", "latdyn.plots", "latdyn.report.figures",
                                                                "latdyn.report.write"))]
    assert broken == []


def test_display_hook_door_is_narrow():
    """Only a ``_repr_html_`` body importing only latdyn.report.notebook is let through."""
    allowed = ast.parse("def _repr_html_(self):\n    from latdyn.report.notebook import modes_html\n")
    other_module = ast.parse("def _repr_html_(self):\n    from latdyn.report.tables import mode_table\n")
    other_function = ast.parse("def show(self):\n    from latdyn.report.notebook import modes_html\n")
    assert _imports(_without_display_hooks(allowed)) == set()
    assert "latdyn.report.tables" in _imports(_without_display_hooks(other_module))
    assert "latdyn.report.notebook" in _imports(_without_display_hooks(other_function))


def test_no_global_matplotlib_state_in_library_code():
    """No ``matplotlib.use``, no pyplot anywhere in latdyn."""
    offenders = []
    for name, tree in _modules():
        for node in ast.walk(tree):
            if isinstance(node, ast.Attribute) and node.attr == "use" and \
                    isinstance(node.value, ast.Name) and node.value.id in ("matplotlib", "mpl"):
                offenders.append((name, "matplotlib.use"))
        offenders += [(name, i) for i in _imports(tree) if _under(i, ("matplotlib.pyplot", "pylab"))]
    assert offenders == []
