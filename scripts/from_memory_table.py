"""Print the README's table of data values marked "from memory" in the shipped TOML tables.

Usage: python scripts/from_memory_table.py
"""

import glob
import sys

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover
    import tomli as tomllib

TABLES = ("gases/*.toml", "hcfplan/materials/data/*.toml", "hcfplan/materials/data/crystals/*.toml")


def _walk(node, path, out):
    if isinstance(node, dict):
        for key, value in node.items():
            _walk(value, path + [key], out)
    elif isinstance(node, list):
        for i, value in enumerate(node):
            _walk(value, path + [str(i)], out)
    elif isinstance(node, str) and "from memory" in node.lower():
        out.append((".".join(path[:-1]), node))


def main() -> None:
    print("| table | block | source text |")
    print("|---|---|---|")
    for pattern in TABLES:
        for name in sorted(glob.glob(pattern)):
            with open(name, "rb") as handle:
                data = tomllib.load(handle)
            found: list = []
            _walk(data, [], found)
            for where, text in found:
                short = text if len(text) <= 160 else text[:157] + "..."
                print(f"| `{name}` | {where} | {short.replace('|', '/')} |")


if __name__ == "__main__":
    main()
