"""Writes a reference fixture as JSON with one case per line, which keeps it readable and its
diffs small. Shared by the reference scripts beside this file."""

import json
import os


def write_fixture(script_file, name, out):
    """Write `out` (a dict of lists and plain values) to `name` beside `script_file`; returns the path."""
    path = os.path.join(os.path.dirname(os.path.abspath(script_file)), name)
    keys = list(out)
    with open(path, "w") as f:
        f.write("{\n")
        for key in keys:
            value = out[key]
            if isinstance(value, list):
                lines = ",\n".join("  " + json.dumps(r) for r in value)
                f.write(f' "{key}": [\n{lines}\n ]')
            else:
                f.write(f' "{key}": {json.dumps(value)}')
            f.write(",\n" if key != keys[-1] else "\n")
        f.write("}\n")
    return path
