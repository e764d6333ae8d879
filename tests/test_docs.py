"""The documentation builds: Sphinx API reference from the numpydoc docstrings, warnings as errors.

``make test`` installs the ``docs`` extra, so this runs in CI; without Sphinx
installed it is skipped.  About half a minute (it imports every module).
"""

import pathlib
import re
import subprocess
import sys

import pytest

ROOT = pathlib.Path(__file__).resolve().parent.parent

pytest.importorskip("sphinx")
pytest.importorskip("numpydoc")


@pytest.mark.docs
def test_docs_build_without_warnings(tmp_path):
    """Every module has its API page; the glossary page carries every name of DEVELOPERS.md's glossary;
    the published check cases appear as worked examples with their sources."""
    out = tmp_path / "html"
    result = subprocess.run([sys.executable, "-m", "sphinx", "-W", "--keep-going", "-q", "-b", "html",
                             "-d", str(tmp_path / "doctrees"), str(ROOT / "docs"), str(out)],
                            capture_output=True, text=True, timeout=600)
    assert result.returncode == 0, result.stderr[-3000:]
    modules = {".".join(p.relative_to(ROOT).with_suffix("").parts).removesuffix(".__init__")
               for p in (ROOT / "latdyn").rglob("*.py")} - {"latdyn.__main__"}
    assert {p.stem for p in (out / "api").glob("latdyn*.html")} == modules

    developers = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    glossary = developers.split("## Glossary", 1)[1].split("\n## ", 1)[0]
    names = [n for line in glossary.splitlines() if line.startswith("| `")
             for n in re.findall(r"`([^`]+)`", line.split("|")[1])]
    page = (out / "glossary.html").read_text(encoding="utf-8")
    assert names and all(name in page for name in names)

    modes_page = (out / "api" / "latdyn.modes.html").read_text(encoding="utf-8")
    model_page = (out / "api" / "latdyn.model.html").read_text(encoding="utf-8")
    assert "NASA CR-96008" in modes_page and "CR-2144" in model_page
