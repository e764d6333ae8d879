"""``latdyn schema``: the JSON Schema of the aircraft file, for TOML editors."""

from __future__ import annotations

import json
import sys

__all__ = ["add_arguments", "run"]


def add_arguments(parser):
    parser.epilog = ("Save it (latdyn schema > latdyn-aircraft.schema.json) and point your "
                     "editor's TOML schema setting at it to complete and check keys.")


def run(args):
    from latdyn.json_schema import aircraft_json_schema

    sys.stdout.write(json.dumps(aircraft_json_schema(), indent=2) + "\n")
    return 0
