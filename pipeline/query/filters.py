"""Analyst filters shared by every query: which sources, which edge statuses, which item attributes.

>>> Filters(attributes={"colour": "green"}).attribute_patterns()
['"colour": "green"']
>>> Filters().attribute_patterns()   # no filter: a pattern every attribute text contains
['{']
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field

from pipeline.errors import BadInput, NotFound, Problem
from pipeline.schemes import choose_reference
from pipeline.store import Store

LIVE = ("accepted", "auto")
PLACEMENT_STATUSES = ("accepted", "auto")  # the only statuses a PLACED_IN edge can carry
NO_ATTRIBUTE_FILTER = "{"  # items keep their attributes as a JSON object, so every text contains "{"


@dataclass
class Filters:
    """`sources`: only these sources (empty = all). `statuses`: placements through edges of these statuses count
    (`("accepted",)` for people's decisions only). `attributes`: item attributes that must equal these values."""

    sources: list[str] = field(default_factory=list)
    statuses: tuple[str, ...] = LIVE
    attributes: dict[str, str] = field(default_factory=dict)

    def attribute_patterns(self) -> list[str]:
        # The stored text is json.dumps(attrs, ensure_ascii=False, sort_keys=True), so one pair renders exactly
        # like this, quotes included: "price": "12" never matches "price": "12.5".
        pats = [json.dumps({k: v}, ensure_ascii=False)[1:-1] for k, v in sorted(self.attributes.items())]
        return pats or [NO_ATTRIBUTE_FILTER]

    def params(self) -> dict:
        """The query parameters every filtered query file takes."""
        return {"sources": list(self.sources), "statuses": list(self.statuses),
                "attributes": self.attribute_patterns()}


def check_filters(store: Store, filters: Filters | None) -> Filters:
    """Validate against the store: unknown sources are NotFound, unknown statuses BadInput."""
    filters = filters or Filters()
    known = [s["key"] for s in store.rows("schemes_list") if s["role"] == "source"]
    unknown = [s for s in filters.sources if s not in known]
    if unknown:
        raise NotFound(f"unknown source(s): {', '.join(unknown)}; known: {', '.join(known) or 'none'}")
    bad = [s for s in filters.statuses if s not in PLACEMENT_STATUSES]
    if bad or not filters.statuses:
        raise BadInput(Problem(f"edge status must be one or more of {', '.join(PLACEMENT_STATUSES)} "
                               f"(items are placed only through those), got {list(filters.statuses)}",
                               field="--status"))
    return filters


def parse_attribute_filters(pairs: list[str] | None) -> dict[str, str]:
    """`["colour=green", "size=L"]` -> `{"colour": "green", "size": "L"}` (the CLI's `--where KEY=VALUE`)."""
    out: dict[str, str] = {}
    for pair in pairs or []:
        key, sep, value = pair.partition("=")
        if not sep or not key.strip():
            raise BadInput(Problem(f"expected KEY=VALUE, got {pair!r}", field="--where"))
        out[key.strip()] = value.strip()  # attribute values are stored trimmed (items_reader)
    return out


def pick_reference(store: Store, reference: str | None) -> str:
    """The reference scheme key: the one given (checked) or the only one in the store."""
    return choose_reference(store.rows("schemes_list"), reference)
