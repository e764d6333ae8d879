"""Sphinx configuration of the latdyn documentation (``make docs``).

The API pages and the glossary are generated here at build time, so they
never fall behind the code: one page per module of the package (its
``__all__``, from the numpydoc docstrings), and the glossary from the table
in DEVELOPERS.md (its single source).  No network: no intersphinx, no theme
downloads.
"""

import pathlib
import pkgutil
import re
import sys

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

import latdyn  # noqa: E402

project = "latdyn"
author = "the latdyn developers"
copyright = "2026, the latdyn developers"
release = version = latdyn.__version__

extensions = ["sphinx.ext.autodoc", "numpydoc"]
autodoc_member_order = "bysource"
autodoc_typehints = "none"          # the numpydoc Parameters sections say it
numpydoc_show_class_members = False
numpydoc_class_members_toctree = False
numpydoc_validation_checks = set()  # the docstrings are checked by reading, not by rule
exclude_patterns = ["_build", "api/_template"]
html_theme = "alabaster"
html_static_path = []
templates_path = []
nitpicky = False

#: Modules without an API page: the command-line entry point itself.
SKIPPED = {"latdyn.__main__"}


def _write(path, text):
    """Write only when the text changed (no needless rebuilds)."""
    if not path.exists() or path.read_text(encoding="utf-8") != text:
        path.write_text(text, encoding="utf-8")


def _modules():
    names = ["latdyn"]
    for info in pkgutil.walk_packages(latdyn.__path__, "latdyn."):
        if info.name not in SKIPPED:
            names.append(info.name)
    return sorted(names)


def _is_package(name):
    return (ROOT / name.replace(".", "/") / "__init__.py").exists()


def write_api_pages():
    """docs/api/<module>.rst for every module, and docs/api/index.rst listing them."""
    folder = HERE / "api"
    folder.mkdir(exist_ok=True)
    names = _modules()
    for old in folder.glob("latdyn*.rst"):
        if old.stem not in names:
            old.unlink()
    for name in names:
        title = f"``{name}``"
        # a package page shows its docstring only: its names are documented where they are defined
        body = f".. automodule:: {name}\n" + ("" if _is_package(name) else "   :members:\n")
        _write(folder / f"{name}.rst", f"{title}\n{'=' * len(title)}\n\n{body}")
    toc = "\n".join(f"   {name}" for name in names)
    _write(folder / "index.rst", "API reference\n=============\n\nOne page per module, from the "
           "numpydoc docstrings (units in brackets, sources in the References sections).\n\n"
           f".. toctree::\n   :maxdepth: 1\n\n{toc}\n")


def write_glossary():
    """docs/glossary.rst from the glossary table of DEVELOPERS.md (the single source)."""
    text = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    section = text.split("## Glossary", 1)[1].split("\n## ", 1)[0]
    rows = [line for line in section.splitlines() if line.startswith("|")]
    header, body = rows[0], rows[2:]

    def cells(line):  # split on the pipes that are not escaped (\| is a pipe inside a cell)
        inner = line.strip()[1:-1]
        return [c.strip().replace("\\|", "|") for c in re.split(r"(?<!\\)\|", inner)]

    def rst(cell):
        return _escape_bars(re.sub(r"`([^`]+)`", r"``\1``", cell).replace("*", r"\*"))

    lines = ["Glossary", "========", "",
             "Names, symbols and units used in the code, the files and the outputs "
             "(from the glossary of DEVELOPERS.md).", "",
             ".. list-table::", "   :header-rows: 1", ""]
    for row in [header, *body]:
        first, *rest = [rst(c) for c in cells(row)]
        lines.append(f"   * - {first}")
        lines += [f"     - {c}" for c in rest]
    _write(HERE / "glossary.rst", "\n".join(lines) + "\n")


def _escape_bars(line):
    """``|x|`` (an absolute value, |phi/beta|) as text, not an rST substitution; literals untouched."""
    parts = line.split("``")
    for i in range(0, len(parts), 2):
        parts[i] = re.sub(r"(?<!\\)\|", r"\\|", parts[i])
    return "``".join(parts)


def plain_text_bars(app, what, name, obj, options, lines):
    """The docstrings write absolute values as ``|x|``; keep them as written.

    Lines of literal blocks (after ``::``) and doctest blocks stay as they are.
    """
    literal, doctest = None, False
    for i, line in enumerate(lines):
        stripped = line.lstrip()
        indent = len(line) - len(stripped)
        if literal is not None:
            if not stripped or indent > literal:
                continue
            literal = None
        if stripped.startswith(">>>") or (doctest and stripped):
            doctest = True
            continue
        doctest = False
        lines[i] = _escape_bars(line)
        if stripped.endswith("::"):
            literal = indent


def setup(app):
    app.connect("autodoc-process-docstring", plain_text_bars, priority=900)


write_api_pages()
write_glossary()
