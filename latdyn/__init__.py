"""latdyn: lateral-directional flight dynamics from a plain-text aircraft file.

The pipeline, one module per stage::

    aircraft file (aircraft_file) -> validated aircraft (aircraft)
    -> state-space model (model) -> modes (modes)
    -> assessment against criteria (assessment) -> responses (responses)
    -> report (report)

The entry points are at the top level::

    import latdyn
    aircraft = latdyn.load_aircraft("aircraft/kestrel-k40.toml")
    modes = latdyn.find_modes(latdyn.lateral_model(aircraft, "approach"))
    levels = latdyn.assess(aircraft)            # guidance only: see latdyn.NOTICE
    modes.to_pandas(), levels.to_pandas()       # with pandas installed

They are imported on first use (PEP 562), so ``import latdyn`` imports
nothing else, and an entry point brings in only what it needs (never
matplotlib, python-control or scipy for loading a file and finding modes).
The version comes from the installed package's metadata (``pyproject.toml``
is its one home).
"""

#: Top-level name -> the module that defines it (imported on first use).
_ENTRY_POINTS = {
    "load_aircraft": "latdyn.aircraft",
    "lateral_model": "latdyn.model",
    "find_modes": "latdyn.modes",
    "analyse_aircraft": "latdyn.results",
    "assess": "latdyn.assessment",
    "NOTICE": "latdyn.assessment",
    "load_criteria": "latdyn.criteria_sets",
    "builtin_criteria": "latdyn.criteria_sets",
    "make_input": "latdyn.inputs",
    "default_inputs": "latdyn.inputs",
    "simulate": "latdyn.responses",
    "read_response": "latdyn.readouts",
    "transfer_function": "latdyn.transfer_functions",
    "compare_many": "latdyn.compare",
    "sweep": "latdyn.studies.sweep",
    "sensitivities": "latdyn.studies.sensitivity",
    "uncertainty": "latdyn.studies.uncertainty",
    "write_report": "latdyn.report",
    "aircraft_json_schema": "latdyn.json_schema",
    "InputError": "latdyn.errors",
    "LatdynWarning": "latdyn.errors",
}

__all__ = ["__version__", *_ENTRY_POINTS]


def _metadata_version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("latdyn")
    except PackageNotFoundError:  # a source tree that was never installed
        return "0+unknown"


def __getattr__(name):
    if name == "__version__":
        value = _metadata_version()
    elif name in _ENTRY_POINTS:
        import importlib

        value = getattr(importlib.import_module(_ENTRY_POINTS[name]), name)
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value
    return value


def __dir__():
    return sorted({*globals(), *__all__})
