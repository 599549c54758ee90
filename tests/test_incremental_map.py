"""An incremental map (some categories re-mapped alone) reads only what those categories need, and gets the same
evidence as reading everything: the shared-item pairs of the re-mapped categories alone, their members vectors
alone. The scenario is the invented demo (its sources share some item keys)."""

import copy

from demo_layer import demo_layer

from pipeline.match import map_job
from pipeline.match.map_job import MapSettings, _add_instance_votes, _load_side, _plan
from pipeline.store import open_store


def test_instance_votes_of_a_few_categories_equal_those_read_from_every_pair(tmp_path_factory):
    _, store_path, files = demo_layer(tmp_path_factory)
    with open_store(store_path, read_only=True) as s:
        concept_side = _load_side(s, "Concept", "market")
        keys = [src["key"] for src in files.sources]
        pairs = s.frame("shared_category_pairs")
        shared = sorted(set(pairs["category"]))
        assert len(shared) >= 10, "the scenario should share item keys across sources"
        subset = {k: [u for u in shared if u.startswith(f"{k}:")][:5] for k in keys}
        subset = {k: v for k, v in subset.items() if v}
        plans = {k: _plan(s, k, "market", concept_side, MapSettings(), map_job.load_model(s), v)
                 for k, v in subset.items()}
        tops = {u: con for plan in plans.values() for u, con in plan.first_choice().items()}
        everything = copy.deepcopy(plans)
        _add_instance_votes(s, everything, dict(tops), "market")
        remapped = [plan.cats.uids[ci] for plan in plans.values() for ci in plan.todo]
        _add_instance_votes(s, plans, dict(tops), "market", remapped)
    voted = 0
    for k, plan in plans.items():
        want = everything[k]
        got_votes = {ci: v for ci, v in (plan.ev.votes or {}).items()}
        want_votes = {ci: v for ci, v in (want.ev.votes or {}).items() if ci in plan.todo}
        assert got_votes == want_votes
        assert [plan.ev.pools[ci] for ci in plan.todo] == [want.ev.pools[ci] for ci in plan.todo]
        voted += len(got_votes)
    assert voted >= 5  # the comparison had votes to compare
