"""latdyn: lateral-directional flight dynamics from a plain-text aircraft file.

The pipeline, one module per stage::

    aircraft file (aircraft_file) -> validated aircraft (aircraft)
    -> state-space model (model) -> modes (modes)
    -> assessment against criteria (assessment) -> responses (responses)
    -> report (report)

Importing the package is cheap: it imports neither matplotlib nor
python-control; those are loaded where they are needed.  The version comes
from the installed package's metadata (``pyproject.toml`` is its one home).
"""

__all__ = ["__version__"]


def _metadata_version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("latdyn")
    except PackageNotFoundError:  # a source tree that was never installed
        return "0+unknown"


def __getattr__(name):
    if name == "__version__":
        value = globals()["__version__"] = _metadata_version()
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
