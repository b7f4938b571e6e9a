"""A small table of rows (dicts), as ``scan`` and ``compare`` return them."""

from __future__ import annotations

from collections.abc import Iterator, Sequence


class Table:
    """Rows as dicts with one column order; ``to_pandas()`` when pandas is installed.

    ``table[i]`` is row ``i`` (a dict), ``table["column"]`` the list of that column's values
    (None where a row lacks it); ``len(table)`` counts rows; iterating gives the rows.
    """

    def __init__(self, columns: Sequence[str], rows: Sequence[dict]):
        self.columns = tuple(columns)
        self.rows = tuple(dict(r) for r in rows)

    def __len__(self) -> int:
        return len(self.rows)

    def __iter__(self) -> Iterator[dict]:
        return iter(self.rows)

    def __getitem__(self, item):
        if isinstance(item, str):
            if item not in self.columns:
                raise KeyError(f"{item!r}: no such column (columns: {', '.join(self.columns)})")
            return [row.get(item) for row in self.rows]
        return self.rows[item]

    def __repr__(self) -> str:
        return f"<hcfplan Table: {len(self.rows)} rows x {len(self.columns)} columns>"

    def to_pandas(self):
        """A :class:`pandas.DataFrame` with the same columns (needs pandas)."""
        try:
            import pandas as pd
        except ImportError:
            raise ImportError("Table.to_pandas needs pandas: pip install pandas") from None
        return pd.DataFrame([[row.get(c) for c in self.columns] for row in self.rows],
                            columns=list(self.columns))
