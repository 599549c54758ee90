"""Write rejected item rows to a CSV (`line,field,reason,raw`) so nothing is lost silently.

>>> import pathlib, tempfile
>>> from pipeline.records import RejectedRow
>>> p = pathlib.Path(tempfile.mkdtemp()) / "rejects.csv"
>>> write_rejects(p, [RejectedRow(3, "empty title", "title", "k1,,garden")])
1
>>> print(p.read_text(), end="")
line,field,reason,raw
3,title,empty title,"k1,,garden"
"""

from __future__ import annotations

import csv
import os
import tempfile
from collections.abc import Iterable
from os import PathLike
from pathlib import Path

from pipeline.records import RejectedRow

COLUMNS = ["line", "field", "reason", "raw"]


def write_rejects(path: str | PathLike[str], rejects: Iterable[RejectedRow]) -> int:
    """Write every reject (streaming the iterable) and return how many were written.

    The header is written even when there are no rejects, so a reader can tell "none" from "not run". The file is
    written beside the target and renamed into place, so a crash never leaves a half-written rejects file.
    """
    target = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent or ".")
    count = 0
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            w = csv.writer(fh, lineterminator="\n")
            w.writerow(COLUMNS)
            for r in rejects:
                # raw keeps its own line breaks inside quotes; the csv module quotes them
                w.writerow([r.line, r.field or "", r.reason, r.raw])
                count += 1
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return count
