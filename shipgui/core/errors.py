"""One error family for everything a dispatcher can get wrong in the input.

Every error carries the file, the row and the column where there is one, and a
sentence in the dispatcher's words.  Code that loads files collects several
problems of one file and raises them together as :class:`InputErrors`.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

__all__ = ["InputError", "InputErrors", "Problem", "ProblemCollector", "PlanNotVerified",
           "MAX_PROBLEMS"]

# A file with more problems than this is most likely the wrong file; listing
# them all would bury the first ones.
MAX_PROBLEMS = 50


@dataclass(frozen=True)
class Problem:
    """One problem found in the input: where it is and what is wrong."""

    message: str
    file: str | None = None
    row: int | None = None
    column: str | None = None
    job: str | None = None  # the id of the job it is about, where it is about one job

    def __str__(self) -> str:
        where = []
        if self.file:
            where.append(Path(self.file).name)
        if self.row is not None:
            where.append(f"row {self.row}")
        if self.column:
            where.append(f"column '{self.column}'")
        if self.job:
            where.append(f"job {self.job}")
        return (", ".join(where) + ": " if where else "") + self.message


class InputError(Exception):
    """Bad input: a file, a row, a column and what is wrong with it."""

    def __init__(self, message: str, *, file: str | Path | None = None,
                 row: int | None = None, column: str | None = None,
                 job: str | None = None) -> None:
        self.problem = Problem(message, None if file is None else str(file), row, column, job)
        super().__init__(str(self.problem))

    @property
    def problems(self) -> tuple[Problem, ...]:
        return (self.problem,)

    @property
    def file(self) -> str | None:
        return self.problem.file

    @property
    def row(self) -> int | None:
        return self.problem.row

    @property
    def column(self) -> str | None:
        return self.problem.column

    @property
    def job(self) -> str | None:
        return self.problem.job


class InputErrors(InputError):
    """Several problems found together (all problems of one file, up to a limit)."""

    def __init__(self, problems: list[Problem], *, more: int = 0) -> None:
        if not problems:
            raise ValueError("InputErrors needs at least one problem")
        self._problems = tuple(problems)
        self.more = more
        first = problems[0]
        super().__init__(first.message, file=first.file, row=first.row, column=first.column,
                         job=first.job)
        lines = [str(p) for p in problems]
        if more:
            lines.append(f"... and {more} more problems")
        self.args = ("\n".join(lines),)

    @property
    def problems(self) -> tuple[Problem, ...]:
        return self._problems

    def __str__(self) -> str:
        return self.args[0]


@dataclass
class ProblemCollector:
    """Gathers problems so that a file's mistakes are all reported at once."""

    problems: list[Problem] = field(default_factory=list)
    more: int = 0

    def add(self, message: str, file: str | None = None, row: int | None = None,
            column: str | None = None, job: str | None = None) -> None:
        if len(self.problems) < MAX_PROBLEMS:
            self.problems.append(Problem(message, file, row, column, job))
        else:
            self.more += 1

    def absorb(self, error: InputError) -> None:
        """Add the problems of an error raised elsewhere (counted against the same cap)."""
        for p in error.problems:
            self.add(p.message, p.file, p.row, p.column, p.job)
        self.more += getattr(error, "more", 0)

    def __len__(self) -> int:
        return len(self.problems) + self.more

    def raise_if_any(self) -> None:
        if self.problems:
            raise InputErrors(self.problems, more=self.more)


class PlanNotVerified(RuntimeError):
    """The independent check of a plan failed: the plan must not be presented."""
