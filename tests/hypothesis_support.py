"""Shared pieces of the property-based tests: the example budget and a small TOML writer.

The budget is small for CI; ``LATDYN_HYPOTHESIS_EXAMPLES`` raises it for a long local run
(tests marked ``slow`` get a quarter of it).
"""

import json
import math
import os

from hypothesis import HealthCheck, settings

EXAMPLES = int(os.environ.get("LATDYN_HYPOTHESIS_EXAMPLES", "60"))


def budget(share=1.0):
    """Hypothesis settings for ``share`` of the example budget (no deadline)."""
    return settings(max_examples=max(1, int(EXAMPLES * share)), deadline=None,
                    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])


def toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    raise TypeError(value)


def dump(document, prefix=""):
    """A minimal TOML writer for the generated documents (tables and arrays of tables)."""
    lines, tables = [], []
    for key, value in document.items():
        if isinstance(value, dict):
            tables.append((key, value, False))
        elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
            tables.append((key, value, True))
        else:
            lines.append(f"{json.dumps(key)} = {toml_value(value)}")
    for key, value, many in tables:
        name = f"{prefix}{json.dumps(key)}"
        for item in (value if many else [value]):
            lines.append(f"[[{name}]]" if many else f"[{name}]")
            inner = dump(item, name + ".")
            lines.append(inner)
    return "\n".join(lines)
