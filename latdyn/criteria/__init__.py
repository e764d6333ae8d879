"""The built-in handling-qualities criteria sets (data files ``<name>.toml``).

This folder holds data only.  The loader and the criteria dataclasses live
in :mod:`latdyn.criteria_sets`; their names stay importable from here for
code written against earlier versions (``from latdyn.criteria_sets import
load_criteria``).
"""


def __getattr__(name):
    import latdyn.criteria_sets as criteria_sets

    try:
        return getattr(criteria_sets, name)
    except AttributeError:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}") from None
