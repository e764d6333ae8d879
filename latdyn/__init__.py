"""latdyn: lateral-directional flight dynamics from a plain-text aircraft file.

The pipeline, one module per stage::

    aircraft file (aircraft_file) -> validated aircraft (aircraft)
    -> state-space model (model) -> modes (modes)
    -> assessment against criteria (assessment) -> responses (responses)
    -> report (report)

Importing the package is cheap: it imports neither matplotlib nor
python-control; those are loaded where they are needed.
"""

__version__ = "0.1.0"

__all__ = ["__version__"]
