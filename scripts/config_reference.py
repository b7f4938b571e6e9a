"""Print the README's config reference (markdown) from hcfplan.io.schema.SCHEMA.

Usage: python scripts/config_reference.py > /tmp/ref.md  (then paste into README.md)
"""

from hcfplan.io.schema import REQUIRED, SCHEMA


def _default(key) -> str:
    if key.default is REQUIRED:
        return "required"
    if key.default is None:
        return "-"
    return f"`{key.default}`".replace("True", "true").replace("False", "false")


def main() -> None:
    for section, keys in SCHEMA.items():
        print(f"\n**[{section}]**\n")
        print("| key | type | default | meaning |")
        print("|---|---|---|---|")
        for name, key in keys.items():
            kind = key.kind if not key.choices else " \\| ".join(f'"{c}"' for c in key.choices)
            print(f"| `{name}` | {kind} | {_default(key)} | {key.doc} |")


if __name__ == "__main__":
    main()
