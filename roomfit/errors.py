"""The project's small exception tree.

Every error a user can cause carries where (file, field path, line and column when known),
what is wrong (expected against found) and, where one exists, a suggested fix. The CLI turns
:class:`RoomfitError` into a message and exit code 2; nothing else should escape to the user.

"Impossible" and "timed out" solve outcomes are *results*, not exceptions (see ``solver``).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Problem", "RoomfitError", "PlanError", "RuleError", "UnitError"]


@dataclass(frozen=True)
class Problem:
    """One thing wrong with an input, located as precisely as we can.

    ``field`` is a path such as ``rooms[2].outline`` or ``doors[0].width``; ``line`` and
    ``column`` are 1-based and only set for syntax errors.
    """

    field: str
    message: str
    hint: str = ""
    line: int | None = None
    column: int | None = None

    def render(self, source: str = "") -> str:
        where = source
        if self.line is not None:
            where += f":{self.line}" + (f":{self.column}" if self.column is not None else "")
        head = f"{where}: " if where else ""
        field = f"{self.field}: " if self.field else ""
        tail = f" (hint: {self.hint})" if self.hint else ""
        return _printable(f"{head}{field}{self.message}{tail}")


def _printable(text: str) -> str:
    """``text`` with control characters shown as escapes (``\\x1b``), so a hostile key or
    file name cannot drive the terminal that prints the message."""
    return "".join(ch if ch.isprintable() or ch == " " else ascii(ch)[1:-1] for ch in text)


class RoomfitError(Exception):
    """Base of every error the user can cause; carries one or more :class:`Problem`."""

    def __init__(self, problems: list[Problem] | Problem, source: str = "") -> None:
        self.problems: list[Problem] = [problems] if isinstance(problems, Problem) else problems
        self.source = source
        super().__init__(self.render())

    def render(self) -> str:
        return "\n".join(p.render(self.source) for p in self.problems)


class PlanError(RoomfitError):
    """A plan file that cannot be read or does not describe a valid apartment."""


class RuleError(RoomfitError):
    """An unknown rule set, rule id, or an override that does not make sense."""


class UnitError(RoomfitError):
    """A length that cannot be parsed or a unit we do not know."""
