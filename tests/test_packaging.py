"""Packaging: the sdist carries what a user needs, the wheel installs and runs on its own.

The wheel test builds the sdist and, from it, the wheel offline (no build
isolation, so nothing is downloaded), installs the wheel into a fresh
virtual environment that sees this environment's numpy, scipy, control and
matplotlib through a path entry (``--no-deps``: nothing downloaded again),
and runs ``latdyn assess`` on a demo file there, from a folder outside the
source tree.  It takes some ten to twenty seconds; ``-m "not packaging"``
skips it.
"""

import importlib.metadata
import json
import os
import pathlib
import subprocess
import sys
import sysconfig
import tarfile
import venv

import pytest

import latdyn

ROOT = pathlib.Path(__file__).resolve().parent.parent
STEP_TIMEOUT = 180  # [s] per subprocess: a stuck step fails instead of hanging the suite


def run(command, cwd, **kwargs):
    result = subprocess.run(command, cwd=cwd, capture_output=True, text=True,
                            timeout=STEP_TIMEOUT, **kwargs)
    assert result.returncode == 0, (command, result.stdout[-2000:], result.stderr[-2000:])
    return result


def test_licence_file_and_metadata():
    """A permissive licence (MIT), named in the metadata and shipped as a file."""
    text = (ROOT / "LICENSE").read_text()
    assert text.startswith("MIT License")
    assert "Copyright (c) 2026 the latdyn developers" in text
    metadata = importlib.metadata.metadata("latdyn")
    assert metadata["License-Expression"] == "MIT"


def test_version_comes_from_the_metadata_only():
    """One home for the version: pyproject.toml, read back through the installed metadata."""
    assert latdyn.__version__ == importlib.metadata.version("latdyn")
    sources = [p for p in (ROOT / "latdyn").rglob("*.py")]
    assert not [p for p in sources if f'"{latdyn.__version__}"' in p.read_text()]


def test_version_option_and_module_entry():
    """``python -m latdyn`` is the ``latdyn`` command."""
    out = run([sys.executable, "-m", "latdyn", "--version"], ROOT).stdout
    assert out.strip() == f"latdyn {latdyn.__version__}"
    out = run([sys.executable, "-m", "latdyn", "modes", "aircraft/skylark-sv2.toml", "--json"],
              ROOT).stdout
    assert json.loads(out)["latdyn_version"] == latdyn.__version__


def test_criteria_loader_names_stay_importable():
    """The loader moved to latdyn.criteria_sets; latdyn.criteria holds data and forwards names."""
    from latdyn.criteria import load_criteria as old
    from latdyn.criteria_sets import BUILTIN_FOLDER, load_criteria

    assert old is load_criteria
    assert pathlib.Path(BUILTIN_FOLDER) == ROOT / "latdyn" / "criteria"
    assert sorted(p.suffix for p in pathlib.Path(BUILTIN_FOLDER).glob("*.py")) == [".py"]
    with pytest.raises(AttributeError, match="no attribute 'nothing_here'"):
        import latdyn.criteria as data

        data.nothing_here


@pytest.fixture(scope="module")
def sdist(tmp_path_factory):
    """The source distribution, built offline with the installed setuptools."""
    out = tmp_path_factory.mktemp("sdist")
    code = ("import sys; from setuptools import build_meta; "
            "print(build_meta.build_sdist(sys.argv[1]))")
    name = run([sys.executable, "-c", code, str(out)], ROOT).stdout.strip().splitlines()[-1]
    return out / name


@pytest.mark.packaging
def test_sdist_holds_the_demo_aircraft_and_licence(sdist):
    with tarfile.open(sdist) as archive:
        names = {name.split("/", 1)[1] for name in archive.getnames() if "/" in name}
    for path in ROOT.glob("aircraft/**/*.toml"):
        assert str(path.relative_to(ROOT)) in names
    assert {"LICENSE", "README.md", "pyproject.toml", "latdyn/criteria/mil-f-8785c.toml",
            "latdyn/criteria_sets.py"} <= names
    assert not [n for n in names if "__pycache__" in n]


@pytest.mark.packaging
def test_wheel_installs_and_assesses_in_a_fresh_environment(sdist, tmp_path):
    """Built from the sdist, installed alone, it grades a demo aircraft with its criteria data."""
    with tarfile.open(sdist) as archive:
        archive.extractall(tmp_path / "src", filter="data")
    source = next((tmp_path / "src").iterdir())
    wheels = tmp_path / "wheels"
    run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation",
         "--no-index", "--disable-pip-version-check", "-q", "-w", str(wheels), str(source)], tmp_path)
    wheel = next(wheels.glob("latdyn-*.whl"))

    environment = tmp_path / "env"
    venv.EnvBuilder(with_pip=False).create(environment)
    python = environment / "bin" / "python"
    site = pathlib.Path(run([str(python), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                            tmp_path).stdout.strip())
    # numpy, scipy, control, matplotlib and tqdm from this environment; latdyn only from the wheel
    # (a .pth path entry does not run this environment's own .pth files, the editable one included)
    (site / "outer.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
    # --ignore-installed: pip --python sees the running environment's editable latdyn (through
    # the .pth above and pip's own path) and would otherwise skip the wheel as already installed
    run([sys.executable, "-m", "pip", "--python", str(python), "install", "--no-deps", "--no-index",
         "--ignore-installed", "--disable-pip-version-check", "-q", str(wheel)], tmp_path)

    clean = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME")}
    where = run([str(python), "-c", "import latdyn, latdyn.criteria_sets as c; "
                 "print(latdyn.__file__); print(c.BUILTIN_FOLDER)"], tmp_path, env=clean).stdout
    assert all(line.startswith(str(site)) for line in where.split())

    demo = ROOT / "aircraft" / "kestrel-k40.toml"
    result = run([str(environment / "bin" / "latdyn"), "assess", str(demo), "--format", "json"],
                 tmp_path, env=clean)
    document = json.loads(result.stdout)
    assert document["latdyn_version"] == latdyn.__version__
    grades = [a for c in document["conditions"] for a in c["assessments"]]
    assert {a["criteria"] for a in grades} == {"mil-f-8785c", "mil-f-8785c-steady"}
    assert all(a["level"] in (1, 2, 3, 4) for a in grades if a["criteria"] == "mil-f-8785c")
    # the static checks' data file (latdyn/criteria/steady/) is in the wheel
    assert all(a["pass"] in (True, False) for a in grades if a["criteria"] == "mil-f-8785c-steady")
