"""The README's reference of the aircraft file is complete (issue 13, item 5): every key of the
JSON Schema that ``latdyn schema`` prints (generated from the key list the loader checks files
against) is written in a TOML example of the README's "The aircraft file" section or named in
backticks there, with every allowed word of a word key; every built-in criteria set is named;
the sign conventions name every signed quantity of the inputs and outputs."""

import json
import pathlib
import re

import pytest

from latdyn.cli import main

ROOT = pathlib.Path(__file__).resolve().parent.parent
README = (ROOT / "README.md").read_text(encoding="utf-8")
SECTION = README[README.index("## The aircraft file"):README.index("## Commands")]
CODE = "\n".join(re.findall(r"```toml\n(.*?)```", SECTION, re.S))
TICKS = " ".join(re.findall(r"`([^`\n]+)`", re.sub(r"```toml\n.*?```", "", SECTION, flags=re.S)))


def schema(capsys):
    assert main(["schema"]) == 0
    return json.loads(capsys.readouterr().out)


def keys(node, path=()):
    """(dotted path, key, node) of every key of a JSON Schema object, arrays of tables included."""
    if node.get("type") == "array" and isinstance(node.get("items"), dict):
        node = node["items"]
    for key, child in node.get("properties", {}).items():
        yield ".".join(path + (key,)), key, child
        yield from keys(child, path + (key,))


def mentioned(word):
    pattern = rf"(?<![\w]){re.escape(word)}(?![\w])"
    return bool(re.search(pattern, CODE) or re.search(pattern, TICKS))


def test_every_schema_key_is_in_the_readme(capsys):
    found = list(keys(schema(capsys)))
    assert len(found) > 150  # the whole schema, not a part of it
    missing = []
    for path, key, _ in found:
        if path.startswith("uncertainty."):
            continue  # per-derivative tables: checked below, in the uncertainty command's section
        if not mentioned(key):
            missing.append(path)
    assert missing == []


def test_every_allowed_word_is_in_the_readme(capsys):
    missing = []
    for path, key, node in keys(schema(capsys)):
        for word in node.get("enum", ()):
            if isinstance(word, str) and word not in README:
                missing.append(f"{path} = {word}")
    assert missing == []


def test_uncertainty_tables_are_documented(capsys):
    entry = schema(capsys)["properties"]["uncertainty"]["properties"]
    fields = set().union(*(set(table["properties"]) for table in entry.values()))
    assert fields == {"relative", "absolute", "distribution"}
    assert "[uncertainty." in README
    for field in fields:
        assert re.search(rf"(?<![\w]){field}\s*=", README), field


def test_every_builtin_criteria_set_is_named():
    sets = sorted(p.stem for p in (ROOT / "latdyn" / "criteria").glob("*.toml"))
    assert len(sets) >= 7
    assert [name for name in sets if f"`{name}`" not in README] == []


@pytest.mark.parametrize("words", [
    "sideslip β positive", "roll rate p and bank φ positive", "yaw rate r and heading ψ positive",
    "positive aileron gives", "positive rudder", "n_y", "`alpha_deg` and `gamma_deg` are positive",
    "`Ixz` is the integral", "`lateral_position` is positive", "`dihedral_deg` is positive",
    "`sweep_deg` positive", "`vertical_position` positive", "`arm` distances positive",
], ids=lambda words: re.sub(r"\W+", "-", words).strip("-"))
def test_sign_conventions_name_every_signed_input(words):
    conventions = README[README.index("Sign conventions (body axes"):]
    conventions = conventions[:conventions.index("\n\n")]
    assert words in conventions
