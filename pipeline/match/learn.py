"""Fit the scoring model (logistic regression over the evidence features) from labelled pairs.

Labels come from an answer key (`source_code,reference_code`, several rows per code allowed) or from the stewards'
decisions in the store (accepted = right, rejected = wrong). Every candidate the map step considered for a labelled
category becomes one training row: label 1 when the concept is among the category's right answers.
"""

from __future__ import annotations

import json
import logging

import numpy as np

from pipeline.errors import BadInput, Problem
from pipeline.match.features import DEFAULT_WEIGHTS, FEATURES, ScoringModel
from pipeline.match.neighbours import labels_key
from pipeline.match.map_job import MODEL_KEY, MapSettings, _load_side, _plan, load_model
from pipeline.schemes import choose_reference
from pipeline.store import Store

log = logging.getLogger(__name__)


def learn_model(store: Store, labels: dict[str, dict[str, set[str]]], *, reference: str | None = None,
                target_precision: float | None = None, origin: str = "answer key", c: float = 100.0) -> dict:
    """Fit, store and report a model. `labels`: source key -> category code -> right concept codes.

    With `target_precision`, also store the lowest auto threshold at which the top choices of the labelled
    categories reach that precision (on these same labels: an optimistic estimate; say so to the user)."""
    reference = choose_reference(store.rows("schemes_list"), reference)
    concept_side = _load_side(store, "Concept", reference)
    model = load_model(store)
    previous = store.scalar("meta_get", key=MODEL_KEY) or ""
    # The labelled pairs are kept with the model, so every later map run has them for the neighbours feature
    # (a steward's accepted edges are in the store already). Stored first: the training rows see them too, each
    # labelled category voted on by the others only.
    kept = {} if origin == "decisions" else {labels_key(reference): {
        s: {code: sorted(cs) for code, cs in gold.items()} for s, gold in labels.items()}}
    store.run("meta_set", key=MODEL_KEY, value=json.dumps({**model.to_json(), **kept}))
    try:
        return _fit_and_store(store, labels, reference, concept_side, model, kept, target_precision, origin, c)
    except BaseException:
        store.run("meta_set", key=MODEL_KEY, value=previous)
        raise


def _fit_and_store(store, labels, reference, concept_side, model, kept, target_precision, origin, c) -> dict:
    from sklearn.linear_model import LogisticRegression

    xs, ys, tops, depths = [], [], [], set()
    for source, gold in labels.items():
        plan = _plan(store, source, reference, concept_side, MapSettings(), model, None)
        code_of = dict(zip(range(len(plan.concepts.uids)), plan.concepts.codes))
        for ci, rk in enumerate(plan.first or []):
            code = plan.cats.codes[ci]
            if code not in gold or not rk.concepts:
                continue
            right = [code_of[j] in gold[code] for j in rk.concepts]
            xs.append(rk.features)
            ys.extend(right)
            tops.append((ci, source))
            depths.add(int(plan.cats.depth[ci]))
    if not xs or not any(ys) or all(ys):
        raise BadInput(Problem(f"the {origin} gives no usable labels (need categories whose candidates include both "
                               "right and wrong concepts)", field="--learn"))
    prior = np.array([DEFAULT_WEIGHTS.get(f, 0.0) for f in FEATURES])
    weights = fit_conditional_logit(xs, [np.array(r, dtype=bool) for r in _split(ys, xs)], l2=1.0 / c,
                                    prior=prior)
    # Platt scaling on the top choice of each labelled category turns the ranking score into a probability.
    top_logit = np.array([float(x[np.argmax(x @ weights)] @ weights) for x in xs])
    top_right = np.array([bool(r[np.argmax(x @ weights)]) for x, r in zip(xs, _split(ys, xs))])
    if top_right.all() or not top_right.any():
        a, b = 1.0, 0.0
    else:
        platt = LogisticRegression(C=1e4, max_iter=2000).fit(top_logit.reshape(-1, 1), top_right.astype(int))
        a, b = float(platt.coef_[0][0]), float(platt.intercept_[0])
    learned = ScoringModel(weights={f: float(w * a) for f, w in zip(FEATURES, weights)}, bias=b,
                           source=f"learned ({origin}, {len(tops)} categories)", depths=sorted(depths))
    y = np.array(ys, dtype=int)
    store.run("meta_set", key=MODEL_KEY, value=json.dumps({**learned.to_json(), **kept}))
    report = {"model": learned.to_json(), "categories": len(tops), "rows": int(len(y)), "positives": int(y.sum())}
    if target_precision is not None:
        threshold = pick_threshold(store, labels, learned, reference, concept_side, target_precision)
        if threshold is not None:
            store.run("meta_set", key="auto_threshold", value=str(threshold))
        report["auto_threshold"] = threshold
        report["target_precision"] = target_precision
    log.info("learned scoring model: %s", report)
    return report


def _split(flat: list, groups: list[np.ndarray]) -> list[list]:
    out, start = [], 0
    for g in groups:
        out.append(flat[start:start + len(g)])
        start += len(g)
    return out


def fit_conditional_logit(groups: list[np.ndarray], right: list[np.ndarray], *, l2: float = 0.01,
                          prior: np.ndarray | None = None) -> np.ndarray:
    """Weights that rank each category's right candidates first: maximise sum over categories of
    log(sum of softmax probability on the right candidates), with an L2 penalty towards `prior` (default 0).
    (McFadden's conditional logit.) A prior at the default weights keeps what the labels do not speak to: labels
    on leaves alone say little about how inner categories should be scored, yet the model scores every level."""
    from scipy.optimize import minimize

    usable = [(x, r) for x, r in zip(groups, right) if r.any() and not r.all()]
    dim = groups[0].shape[1]

    centre = np.zeros(dim) if prior is None else np.asarray(prior, dtype=np.float64)

    def loss(w):
        total, grad = l2 * (w - centre) @ (w - centre), 2 * l2 * (w - centre)
        for x, r in usable:
            z = x @ w
            z -= z.max()
            e = np.exp(z)
            p_all = e / e.sum()
            p_right = e[r] / e[r].sum()
            total -= np.log(e[r].sum() / e.sum())
            grad -= p_right @ x[r] - p_all @ x
        return total, grad

    start = centre.copy() if prior is not None else np.array([10.0 if i == 0 else 1.0 for i in range(dim)])
    return minimize(loss, start, jac=True, method="L-BFGS-B").x


def pick_threshold(store, labels, model, reference, concept_side, target: float) -> float | None:
    """Lowest rank-1 probability at which the labelled top choices are right at least `target` of the time."""
    scored = []
    for source, gold in labels.items():
        plan = _plan(store, source, reference, concept_side, MapSettings(), model, None)
        for ci, rk in enumerate(plan.first or []):
            code = plan.cats.codes[ci]
            if code in gold and rk.concepts:
                scored.append((rk.probs[0], plan.concepts.codes[rk.concepts[0]] in gold[code]))
    scored.sort(reverse=True)
    best = None
    right = 0
    for n, (p, ok) in enumerate(scored, start=1):
        right += ok
        if right / n >= target:
            best = p
    return None if best is None else round(float(best), 6)


def forget_model(store: Store) -> None:
    """Back to the default weights and threshold."""
    store.run("meta_set", key=MODEL_KEY, value="")
    store.run("meta_set", key="auto_threshold", value="")


def labels_from_answer_key(path, *, source: str | None) -> dict[str, dict[str, set[str]]]:
    """Answer key CSV: `source_code,reference_code`, with an optional `source_key` column (then `source` filters
    it); without that column `source` names the source the whole file is about."""
    from pipeline.ingest.text_input import read_csv_rows

    out: dict[str, dict[str, set[str]]] = {}
    for line, row in read_csv_rows(path, required=["source_code", "reference_code"]):
        key = (row.get("source_key") or "").strip() or source
        if not key:
            raise BadInput(Problem("no source named: add a source_key column or pass --source", file=str(path),
                                   line=line, field="source_key"))
        if source and key != source:
            continue
        out.setdefault(key, {}).setdefault(row["source_code"].strip(), set()).add(row["reference_code"].strip())
    if not out:
        raise BadInput(Problem("no answer-key rows for the chosen source", file=str(path)))
    return out


def labels_from_decisions(store: Store, sources: list[str], reference: str | None = None):
    """Stewards' accepted edges as right answers (rejected ones simply never count as right)."""
    reference = choose_reference(store.rows("schemes_list"), reference)
    out: dict[str, dict[str, set[str]]] = {}
    for source in sources:
        df = store.frame("decided_codes", source=source, reference=reference)
        for code, concept, status in zip(df.get("source_code", []), df.get("concept_code", []),
                                         df.get("status", [])):
            if status == "accepted":
                out.setdefault(source, {}).setdefault(code, set()).add(concept)
    return out
