"""Which reference hierarchy a command works on: the one named, or the only one in the store."""

from __future__ import annotations

from pipeline.errors import BadInput, NotFound, Problem


def choose_reference(schemes: list[dict], reference: str | None = None) -> str:
    """`schemes`: rows of the `schemes_list` query."""
    refs = [s["key"] for s in schemes if s["role"] == "reference"]
    if reference:
        if reference not in refs:
            raise NotFound(f"no reference scheme {reference!r}; known: {', '.join(refs) or 'none'}")
        return reference
    if not refs:
        raise NotFound("no reference hierarchy in the store; ingest one with `graftwork ingest reference`")
    if len(refs) > 1:
        raise BadInput(Problem(f"several reference schemes ({', '.join(refs)}); choose one with --reference",
                               field="--reference"))
    return refs[0]


def pick_reference(store, reference: str | None = None) -> str:
    return choose_reference(store.rows("schemes_list"), reference)
