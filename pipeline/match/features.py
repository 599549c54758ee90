"""Evidence for one (category, candidate concept) pair, each a named feature in 0..1.

- text: fused cosine of path, label and gloss vectors (`candidates.stack_signals`);
- lexical: word and character-trigram overlap of the labels after normalisation (best over alt labels);
- members: cosine of the mean vector of the category's member item titles with the concept's gloss vector
  (the text score stands in when a category has no items, so it neither helps nor hurts);
- parent: 1 when the candidate is at or under the concept chosen for the category's parent, 0 when not,
  0.5 when the category has no mapped parent;
- depth: how usual the candidate's depth is for categories at this depth (learned per run, `rank.learn_depth_prior`);
  0.5 until learned;
- instance: share of the category's shared items (same item key in another source) placed on this concept there;
- path, label, gloss: the separate cosines behind `text` (path~path, label~label, label~gloss), so a learned model can
  weigh them for the taxonomies at hand (the default weights leave them at 0: they are already inside `text`);
- role: 1 when the concept's leaf/inner role matches the category's, else 0 (default weight 0);
- siblings: share of the category's siblings with a person's accepted edge whose concept region (the concept, or a
  leaf's parent, and what lies under it) holds the candidate; 0 while no sibling is decided. Decisions on a few
  children so pull the rest of the family, in this run and every later one.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

FEATURES = ("text", "lexical", "members", "parent", "depth", "instance", "path", "label", "gloss", "role", "siblings",
            "neighbours", "aligned")
NEUTRAL = {"parent": 0.5, "depth": 0.5, "instance": 0.0, "role": 0.5, "siblings": 0.0, "neighbours": 0.0}

# Default logistic weights, used until a model is learned from labelled edges (`map --learn`). Set by reasoning,
# not fitted: text dominates; each other feature can move a close call but not overturn a clear text winner.
# `aligned` equals `text` until labels fit a map, so the two halves add up to text's former weight of 12.
DEFAULT_WEIGHTS = {"text": 6.0, "aligned": 6.0, "lexical": 2.0, "members": 3.0, "parent": 1.0, "depth": 1.5,
                   "instance": 2.0, "siblings": 2.0, "neighbours": 4.0}
DEFAULT_BIAS = -12.0


@dataclass
class ScoringModel:
    weights: dict[str, float] = field(default_factory=lambda: dict(DEFAULT_WEIGHTS))
    bias: float = DEFAULT_BIAS
    source: str = "default"  # "default", or what it was learned from
    depths: list[int] | None = None  # source depths its labels came from (None: every depth)

    def for_depth(self, depth: int) -> "ScoringModel":
        """This model where its labels speak (their depths), the default weights elsewhere: labels on one level of
        the source say little about how to score another, and a wrong inner choice misleads its children."""
        return self if self.depths is None or depth in self.depths else ScoringModel()

    def logit(self, feats: np.ndarray, disabled: frozenset[str] = frozenset()) -> np.ndarray:
        """`feats`: (n, len(FEATURES)) in FEATURES order; a disabled feature contributes as if neutral."""
        w = np.array([0.0 if f in disabled else self.weights.get(f, 0.0) for f in FEATURES])
        base = self.bias + sum(self.weights.get(f, 0.0) * _neutral_value(f, feats) for f in disabled if f in FEATURES)
        return feats @ w + base

    def probability(self, feats: np.ndarray, disabled: frozenset[str] = frozenset()) -> np.ndarray:
        return 1.0 / (1.0 + np.exp(-self.logit(feats, disabled)))

    def to_json(self) -> dict:
        out = {"weights": self.weights, "bias": self.bias, "source": self.source}
        return out if self.depths is None else {**out, "depths": self.depths}

    @classmethod
    def from_json(cls, data: dict) -> "ScoringModel":
        return cls(weights={k: float(v) for k, v in data["weights"].items()}, bias=float(data["bias"]),
                   source=data.get("source", "learned"), depths=data.get("depths"))


def _neutral_value(name: str, feats: np.ndarray):
    if name in NEUTRAL:
        return NEUTRAL[name]
    if name in ("members", "lexical", "path", "label", "gloss", "aligned"):
        return feats[:, FEATURES.index("text")]  # switched off = as if it agreed with the text evidence
    return 0.0
