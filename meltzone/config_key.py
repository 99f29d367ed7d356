"""One configuration key: default, unit, meaning, allowed values and source (used by :mod:`meltzone.config`)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any


@dataclass(frozen=True)
class Key:
    """One configuration key: default, unit, meaning and allowed values."""

    default: Any
    unit: str
    doc: str
    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    hi_open: bool = False
    choices: tuple[str, ...] | None = None
    source: str = ""
    #: A value outside [lo, hi] that is allowed with a special meaning (e.g. 0 = "molten start"), described in doc.
    special: float | None = None
    #: Longest allowed string (string keys).
    max_len: int | None = None
    #: A string key that must not be empty or blank (a label the reports print).
    nonblank: bool = False

    @property
    def kind(self) -> type:
        return type(self.default)

    def allowed(self) -> str:
        if self.choices is not None:
            return "one of " + ", ".join(repr(c) for c in self.choices)
        if self.kind is str:
            blank = "a non-blank string" if self.nonblank else "a string"
            return f"{blank} of at most {self.max_len} characters without control characters"
        parts = []
        if self.lo is not None:
            parts.append(f"{'>' if self.lo_open else '>='} {self.lo:g}")
        if self.hi is not None:
            parts.append(f"{'<' if self.hi_open else '<='} {self.hi:g}")
        what = "an integer" if self.kind is int else "a number"
        text = what + (" " + " and ".join(parts) if parts else "")
        return text if self.special is None else f"{self.special:g} or {text}"
