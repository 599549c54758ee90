"""Progress bars on a terminal, nothing otherwise (nightly jobs log instead)."""

from __future__ import annotations

import contextlib
import sys


class _Silent:
    def update(self, n: int = 1) -> None:
        pass


@contextlib.contextmanager
def progress(desc: str, total: int | None = None, unit: str = "rows"):
    """Yield an object with `update(n)`; draws a tqdm bar only when stderr is a terminal."""
    if not sys.stderr.isatty():
        yield _Silent()
        return
    from tqdm import tqdm

    with tqdm(total=total, desc=desc, unit=unit, leave=False) as bar:
        yield bar
