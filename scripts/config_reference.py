"""The README's config reference (markdown), generated from hcfplan.io.schema.SCHEMA.

Usage:
    python scripts/config_reference.py                    # print it
    python scripts/config_reference.py --update README.md # rewrite the marked block in place
"""

from __future__ import annotations

import sys
from pathlib import Path

from hcfplan.io.schema import REQUIRED, SCHEMA
from hcfplan.io.stages import STAGE_SECTIONS, STAGE_TABLE

START, END = "<!-- config-reference:start -->", "<!-- config-reference:end -->"


def _default(key) -> str:
    if key.default is REQUIRED:
        return "required"
    if key.default is None:
        return "-"
    return f"`{key.default}`".replace("True", "true").replace("False", "false")


def _stages_note() -> list[str]:
    """The paragraph on cascaded stages (``[[stage]]``) above the tables."""
    sections = ", ".join(f"`[{s}]`" for s in STAGE_SECTIONS)
    written = ", ".join(f"`[{STAGE_TABLE}.{s}]`" for s in STAGE_SECTIONS)
    return ["", f"**[[{STAGE_TABLE}]]** (cascaded stages, optional): an array of tables, each "
            f"holding the {sections} sections of one stage, written {written} after its "
            f"`[[{STAGE_TABLE}]]` line, with the keys of the tables below; the other sections "
            "hold for every stage. Without it the top-level sections are the one stage; both "
            "forms in one file are refused. A key of one stage is "
            f"`{STAGE_TABLE}.K.section.key` (K = 0, 1, ...) in `--set`, `--vary` and "
            "messages. See \"Cascaded stages\" under \"Workflows\"."]


def reference() -> str:
    lines: list[str] = _stages_note()
    for section, keys in SCHEMA.items():
        lines += ["", f"**[{section}]**", "", "| key | type | default | meaning |",
                  "|---|---|---|---|"]
        for name, key in keys.items():
            kind = key.kind if not key.choices else " \\| ".join(f'"{c}"' for c in key.choices)
            lines.append(f"| `{name}` | {kind} | {_default(key)} | {key.doc} |")
    return "\n".join(lines) + "\n"


def update(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    head, rest = text.split(START, 1)
    _, tail = rest.split(END, 1)
    path.write_text(head + START + "\n" + reference() + END + tail, encoding="utf-8")


if __name__ == "__main__":
    if len(sys.argv) == 3 and sys.argv[1] == "--update":
        update(Path(sys.argv[2]))
    else:
        print(reference())
