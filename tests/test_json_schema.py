"""``latdyn schema``: the JSON Schema of the aircraft file follows the key schema.

The schema is checked with a small validator written here (type, enum,
properties, additionalProperties, items: the JSON Schema draft 7 keywords the
generated document uses, with their meaning from the draft-07 validation
specification), on the demo files and on files the loader rejects for an
unknown key or a wrong word.
"""

import json
import pathlib
import tomllib

import pytest

from latdyn.aircraft import load_aircraft
from latdyn.aircraft_file import SCHEMA
from latdyn.cli import main
from latdyn.errors import InputError
from latdyn.json_schema import DRAFT, aircraft_json_schema

ROOT = pathlib.Path(__file__).resolve().parent.parent
DEMO_FILES = sorted((ROOT / "aircraft").rglob("*.toml"))

_TYPES = {"object": dict, "array": list, "string": str, "boolean": bool}


def problems(value, schema, where="$"):
    """Every place where ``value`` breaks ``schema`` (the keywords listed above)."""
    out = []
    kind = schema.get("type")
    if kind == "number":
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            return [f"{where}: expected a number"]
    elif kind is not None and not isinstance(value, _TYPES[kind]):
        return [f"{where}: expected {kind}"]
    if "enum" in schema and value not in schema["enum"]:
        out.append(f"{where}: {value!r} not in {schema['enum']}")
    if isinstance(value, dict):
        properties = schema.get("properties", {})
        for key, item in value.items():
            if key in properties:
                out += problems(item, properties[key], f"{where}.{key}")
            elif schema.get("additionalProperties") is False:
                out.append(f"{where}: unknown key {key}")
    if isinstance(value, list) and "items" in schema:
        for i, item in enumerate(value):
            out += problems(item, schema["items"], f"{where}[{i}]")
    return out


def schema_keys(schema, prefix=""):
    """Dotted key paths of a key schema (SCHEMA layout)."""
    for key, sub in schema.items():
        yield prefix + key
        if isinstance(sub, dict):
            yield from schema_keys(sub, prefix + key + ".")


def document_keys(document, prefix=""):
    """Dotted key paths of a generated JSON Schema."""
    for key, sub in document["properties"].items():
        yield prefix + key
        table = sub.get("items", sub)
        if table.get("type") == "object":
            yield from document_keys(table, prefix + key + ".")


def test_command_prints_the_schema(capsys):
    assert main(["schema"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert document == aircraft_json_schema()
    assert document["$schema"] == DRAFT


def test_every_key_of_the_key_schema():
    """Generated from SCHEMA: the same key paths, tables closed to other keys."""
    document = aircraft_json_schema()
    assert sorted(document_keys(document)) == sorted(schema_keys(SCHEMA))
    assert document["additionalProperties"] is False
    assert document["properties"]["condition"]["items"]["additionalProperties"] is False


def test_a_key_added_to_the_key_schema_appears(monkeypatch):
    """A helper who extends SCHEMA gets the key in the JSON Schema with no other change."""
    extended = {**SCHEMA, "geometry": {**SCHEMA["geometry"], "tail_span": "length"}}
    document = aircraft_json_schema(extended)
    entry = document["properties"]["geometry"]["properties"]["tail_span"]
    assert entry == {"type": "number", "description": "length [m (SI) or ft (US)]"}


@pytest.mark.parametrize("path", DEMO_FILES, ids=lambda p: p.name)
def test_demo_files_follow_the_schema(path):
    tree = tomllib.loads(path.read_text())
    assert problems(tree, aircraft_json_schema()) == []


BROKEN = [
    ("unknown-top-key", 'wingspan = 12.0\n', "unknown key wingspan"),
    ("unknown-condition-key", None, "unknown key speeed"),
    ("wrong-units-word", None, "'metric' not in"),
    ("number-as-text", None, "expected a number"),
]


@pytest.mark.parametrize("name, prefix, message", BROKEN, ids=[b[0] for b in BROKEN])
def test_schema_and_loader_reject_the_same_files(tmp_path, name, prefix, message):
    """What the schema flags, the loader rejects too (exit-2 input errors)."""
    original = text = (ROOT / "aircraft" / "skylark-sv2.toml").read_text()
    if name == "unknown-condition-key":
        text = text.replace("speed =", "speeed =", 1)
    elif name == "wrong-units-word":
        text = text.replace('units = "SI"', 'units = "metric"', 1)
    elif name == "number-as-text":
        text = text.replace("mass = ", "mass = '1' #", 1)
    else:
        text = prefix + text
    assert text != original
    path = tmp_path / f"{name}.toml"
    path.write_text(text)
    found = problems(tomllib.loads(text), aircraft_json_schema())
    assert any(message in p for p in found), found
    with pytest.raises(InputError):
        load_aircraft(path)
