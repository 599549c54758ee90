"""SKOS match type of a chosen edge, from labels and from how the source's own hierarchy maps.

- exactMatch: the category's normalised label equals the concept's preferred or an alternative label;
- broadMatch: the concept is broader than the category: the category's parent or a sibling lands on the same
  concept (so the concept covers more than this one category), or the category sits deeper in its tree than the
  concept does in the reference and the concept has children the category does not cover;
- narrowMatch: the concept is one of several concepts the category is split across (a 1:n crosswalk);
- closeMatch: otherwise (equivalent in meaning, worded differently).
"""

from __future__ import annotations

from pipeline.match.normalise import normalise_label


def match_type(cat_label: str, concept_labels: list[str], *, shared_with_family: bool, split: bool) -> str:
    norm = normalise_label(cat_label)
    if any(norm == normalise_label(lab) for lab in concept_labels if lab):
        return "exactMatch"
    if split:
        return "narrowMatch"
    if shared_with_family:
        return "broadMatch"
    return "closeMatch"
