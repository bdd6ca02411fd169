"""Study results as a table: a list of row dictionaries, with CSV, JSON and pandas views.

Each row holds the parameter values of one case (keys are the parameter paths), the figures
(keys are the figure names, SI units), ``case`` (its 0-based number) and ``error`` (empty, or
the message of a case that failed; its figures are then NaN). pandas is optional: only
:meth:`StudyTable.to_dataframe` needs it.
"""

from __future__ import annotations

import csv
import io
import json
import math
from collections.abc import Iterator
from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True)
class StudyTable:
    """Rows of a study, in case order.

    Attributes
    ----------
    parameters : tuple of str
        Parameter columns (field paths).
    figures : tuple of str
        Figure columns (figure names).
    rows : tuple of dict
        One per case: ``case``, the parameters, the figures, ``error``.
    notes : dict
        Free extra information (e.g. the seed of a spread).
    """

    parameters: tuple[str, ...]
    figures: tuple[str, ...]
    rows: tuple[dict, ...]
    notes: dict = field(default_factory=dict, compare=False)

    @property
    def columns(self) -> tuple[str, ...]:
        return ("case", *self.parameters, *self.figures, "error")

    def __len__(self) -> int:
        return len(self.rows)

    def __iter__(self) -> Iterator[dict]:
        return iter(self.rows)

    @property
    def failed(self) -> tuple[dict, ...]:
        """Rows of cases that raised an error."""
        return tuple(r for r in self.rows if r.get("error"))

    def column(self, name: str) -> list:
        """One column as a list (NaN for failed cases' figures)."""
        if name not in self.columns:
            raise KeyError(f"No column '{name}'; the columns are {', '.join(self.columns)}.")
        return [r.get(name) for r in self.rows]

    def to_records(self) -> list[dict]:
        """A list of plain dictionaries, one per case, keys in column order."""
        return [{c: r.get(c) for c in self.columns} for r in self.rows]

    def to_csv(self, path=None) -> str:
        """CSV text (written to ``path`` too when given); SI units as in the column names."""
        buffer = io.StringIO()
        writer = csv.DictWriter(buffer, fieldnames=list(self.columns), lineterminator="\n")
        writer.writeheader()
        for r in self.to_records():
            writer.writerow({k: ("" if v is None else repr(v) if isinstance(v, float) else v) for k, v in r.items()})
        text = buffer.getvalue()
        if path is not None:
            with open(path, "w", encoding="utf-8", newline="") as f:
                f.write(text)
        return text

    def to_json(self, path=None) -> str:
        """JSON text ``{"parameters", "figures", "rows", "notes"}``; NaN becomes null."""

        def clean(v: Any) -> Any:
            return None if isinstance(v, float) and not math.isfinite(v) else v

        data = {"parameters": list(self.parameters), "figures": list(self.figures),
                "rows": [{k: clean(v) for k, v in r.items()} for r in self.to_records()],
                "notes": self.notes}
        text = json.dumps(data, indent=1, allow_nan=False)
        if path is not None:
            with open(path, "w", encoding="utf-8") as f:
                f.write(text + "\n")
        return text

    def to_dataframe(self):
        """A pandas DataFrame of the rows (needs pandas, an optional dependency)."""
        try:
            import pandas as pd
        except ImportError:
            from solver.errors import SolverError

            raise SolverError("to_dataframe needs pandas; install it, or use to_records() / to_csv().") from None
        return pd.DataFrame(self.to_records(), columns=list(self.columns))
