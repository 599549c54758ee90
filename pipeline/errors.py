"""Error classes raised deep in the library and turned into one line and an exit code at the CLI edge."""

from __future__ import annotations

from dataclasses import dataclass


class GraftworkError(Exception):
    """Base class; `exit_code` is what the CLI returns for it."""

    exit_code = 1


@dataclass
class Problem:
    """One concrete defect in an input: where it is and what is wrong."""

    message: str
    file: str | None = None
    line: int | None = None
    column: int | None = None
    field: str | None = None

    def __str__(self) -> str:
        where = self.file or "<input>"
        if self.line is not None:
            where += f":{self.line}"
            if self.column is not None:
                where += f":{self.column}"
        if self.field:
            where += f" [{self.field}]"
        return f"{where}: {self.message}"


class BadInput(GraftworkError):
    """An input file (or option) was rejected; nothing was written. Carries every problem found."""

    exit_code = 2

    def __init__(self, problems: list[Problem] | Problem | str, *, file: str | None = None):
        if isinstance(problems, str):
            problems = [Problem(problems, file=file)]
        elif isinstance(problems, Problem):
            problems = [problems]
        self.problems: list[Problem] = list(problems)
        super().__init__(self.summary())

    def summary(self, limit: int = 20) -> str:
        lines = [str(p) for p in self.problems[:limit]]
        if len(self.problems) > limit:
            lines.append(f"... and {len(self.problems) - limit} more problems")
        return "\n".join(lines)


class StoreLocked(GraftworkError):
    """Another process holds the store for writing."""

    exit_code = 3


class NotAStore(GraftworkError):
    """The path exists but is not a graftwork store (or has an incompatible schema)."""

    exit_code = 2


class NotFound(GraftworkError):
    """A scheme, category or concept named by the user does not exist in the store."""

    exit_code = 2
