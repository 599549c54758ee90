"""Plain records passed from parsers to writers. Parsers never touch the store; writers never parse."""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass
class ConceptRecord:
    """One node of a reference hierarchy as read from a file (before validation)."""

    code: str
    pref_label: str
    parent_codes: list[str] = field(default_factory=list)
    iri: str = ""
    alt_labels: list[str] = field(default_factory=list)
    definition: str = ""
    deprecated: bool = False
    line: int | None = None  # source line when the format has lines (CSV); None for RDF


@dataclass
class CategoryRecord:
    """One node of a source taxonomy as read from a file (before validation)."""

    code: str
    label: str
    parent_code: str | None = None
    line: int | None = None


@dataclass
class ItemRecord:
    """One member record of a source: key, title, the category codes it is filed under, extra attributes."""

    key: str
    title: str
    category_codes: list[str]
    attributes: dict[str, str] = field(default_factory=dict)
    line: int | None = None


@dataclass
class RejectedRow:
    """A malformed item row, kept with its line and reason so nothing is silently lost."""

    line: int
    reason: str
    field: str | None
    raw: str
