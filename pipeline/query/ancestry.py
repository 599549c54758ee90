"""Rollup counts without a variable-length path: read every placement once as numbers, walk the concept hierarchy
once in Python, and count distinct items per (concept, source) with numpy.

The engine form (`cypher/common/query_rollup.cypher`, `BROADER*0..30` from every concept, then
`count(DISTINCT i.uid)`) repeated the walk per concept and per placement below it, so it grew with items
(3.1 s median at 250k items). Here an item placed once adds to its concept's ancestors directly; only items
placed more than once (a few percent) are expanded to (item, ancestor) pairs and de-duplicated, so an item still
counts once under an ancestor that two of its placements share.

>>> node, anc = closure(3, np.array([1, 2]), np.array([0, 1]))  # 0 <- 1 <- 2 (child, parent links)
>>> sorted(zip(node.tolist(), anc.tolist()))
[(0, 0), (1, 0), (1, 1), (2, 0), (2, 1), (2, 2)]
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np
import pandas as pd

from pipeline.store import Store

MAX_HOPS = 30  # the same bound as query_rollup's BROADER*0..30
RUN_BLOCK = 1024  # item keys per run in rollup_item_runs: small enough that ingest batches fill whole blocks
LONG_COLUMNS = ["concept_code", "concept_label", "depth", "source", "items"]
PACK_CONCEPTS = 1 << 20  # rollup_placements_packed: item * 4 * 2**20 + concept * 4 + status
STATUS_CODES = {"accepted": 1, "auto": 2}  # rollup_placements' status column (0: any other status)


class Window:
    """The concepts a rollup reports and, per placed concept, which of them count it: its ancestors-or-self (within
    MAX_HOPS) that belong to `reference`, have `min_depth <= depth <= max_depth`, are among `uids` (if given) and
    are `root` or below it (if given) -- the conditions query_rollup puts on its `k`. Concepts are numbered
    0..n-1 in the order of `concepts` (rows of rollup_hierarchy: key, uid, scheme, code, label, depth, parent)."""

    def __init__(self, concepts: pd.DataFrame, *, reference: str, min_depth: int, max_depth: int, root: str = "",
                 uids: Iterable[str] = ()):
        nodes = concepts.drop_duplicates("key")
        self.keys = pd.Index(nodes["key"].to_numpy())
        self.code = nodes["code"].to_numpy(dtype=object)
        self.label = nodes["label"].to_numpy(dtype=object)
        depth = pd.to_numeric(nodes["depth"]).to_numpy(dtype=float)  # NaN where a depth is missing
        self.depth = depth
        links = concepts[concepts["parent"].notna()]
        child = self.keys.get_indexer(links["key"].to_numpy()).astype(np.int64)
        parent = self.keys.get_indexer(links["parent"].to_numpy()).astype(np.int64)
        self.child, self.parent = child[parent >= 0], parent[parent >= 0]
        # NaN compares false, as a null depth does in the query's WHERE
        self.counted = ((nodes["scheme"].to_numpy(dtype=object) == reference)
                        & (depth >= min_depth) & (depth <= max_depth))
        uids = list(uids)
        uid = pd.Index(nodes["uid"].to_numpy(dtype=object))
        if uids:
            self.counted &= uid.isin(uids)
        if root:
            below = np.zeros(len(uid), dtype=bool)
            at = uid.get_indexer([root])
            if at[0] >= 0:
                below[reach(at, self.parent, self.child)] = True  # root and its descendants within MAX_HOPS
            self.counted &= below

    @classmethod
    def load(cls, store: Store, **window) -> Window:
        return cls(store.frame("rollup_hierarchy"), **window)

    def __len__(self) -> int:
        return len(self.keys)

    def targets(self) -> tuple[np.ndarray, np.ndarray]:
        """(starts, flat): the counted concepts a placement on concept c adds to are flat[starts[c]:starts[c+1]]."""
        node, anc = closure(len(self), self.child, self.parent)
        keep = self.counted[anc]
        node, anc = node[keep], anc[keep]
        order = np.argsort(node, kind="stable")
        starts = np.zeros(len(self) + 1, dtype=np.int64)
        np.cumsum(np.bincount(node, minlength=len(self)), out=starts[1:])
        return starts, anc[order]


def reach(start: np.ndarray, src: np.ndarray, dst: np.ndarray) -> np.ndarray:
    """Nodes reachable from `start` along src->dst links in 0..MAX_HOPS steps."""
    seen = np.zeros(int(max(src.max(initial=-1), dst.max(initial=-1), start.max(initial=-1))) + 1, dtype=bool)
    seen[start] = True
    frontier = start
    for _ in range(MAX_HOPS):
        nxt = dst[np.isin(src, frontier)]
        nxt = np.unique(nxt[~seen[nxt]])
        if not len(nxt):
            break
        seen[nxt] = True
        frontier = nxt
    return np.nonzero(seen)[0]


def closure(n: int, child: np.ndarray, parent: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Every (node, ancestor-or-self) pair within MAX_HOPS, each once, breadth first over all nodes at a time;
    each level is de-duplicated, so diamonds and a damaged, cyclic store stay bounded (at most MAX_HOPS levels)."""
    order = np.argsort(child, kind="stable")
    pflat = parent[order]
    pstart = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(child, minlength=n), out=pstart[1:])
    plen = pstart[1:] - pstart[:-1]
    node = anc = np.arange(n, dtype=np.int64)
    found = [node * n + anc]
    for _ in range(MAX_HOPS):
        reps = plen[anc]
        if not reps.sum():
            break
        pos = np.arange(int(reps.sum())) - np.repeat(np.cumsum(reps) - reps, reps) + np.repeat(pstart[anc], reps)
        pair = np.unique(np.repeat(node, reps) * n + pflat[pos])
        found.append(pair)
        node, anc = pair // n, pair % n
    pair = np.unique(np.concatenate(found))  # a pair reached by paths of two lengths (a diamond) once
    return pair // n, pair % n


def item_sources(store: Store, attributes: list[str]) -> tuple[list[str], np.ndarray, np.ndarray, np.ndarray]:
    """(source names, lo, hi, source index) runs of item keys, sorted by lo: key x belongs to source
    names[idx[j]] when lo[j] <= x <= hi[j]. `attributes` [] = no attribute filter; items outside every run did not
    pass it. Uses whole-block runs (rollup_item_runs) when every run is gap-free, else one row per item."""
    if attributes:
        runs = store.frame("rollup_item_runs_where", block=RUN_BLOCK, attributes=attributes)
    else:
        runs = store.frame("rollup_item_runs", block=RUN_BLOCK)
    lo, hi, n = (runs[c].to_numpy(dtype=np.int64) for c in ("lo", "hi", "n"))
    source = runs["source"]
    if not np.array_equal(hi - lo + 1, n):  # a gap: another source's item (or a filtered one) inside the range
        rows = store.frame("rollup_items", attributes=attributes or ["{"])
        lo = hi = rows["item"].to_numpy(dtype=np.int64)
        source = rows["source"]
    codes, names = pd.factorize(source)
    order = np.argsort(lo, kind="stable")
    return [str(s) for s in names], lo[order], hi[order], codes[order].astype(np.int64)


def distinct_counts(store: Store, win: Window, params: dict, *, by_status: bool) -> tuple[list[str], np.ndarray]:
    """(source names, counts[concept, accepted, source]): distinct items under each counted concept. With
    `by_status`, an item counts under accepted (1) when any of its placements there is accepted, else under auto
    (0); without, everything is in column 0. `params` are `Filters.params()`."""
    pattern = [a for a in params["attributes"] if a != "{"]  # '{' is the no-filter pattern (see filters.py)
    names, lo, hi, src_of_run = item_sources(store, pattern)
    n_src, n = len(names), len(win)
    out = np.zeros((n, 2, max(n_src, 1)), dtype=np.int64)
    if not n_src:
        return names, out
    wanted = set(params["sources"]) if params["sources"] else None
    src_of_run = np.where([wanted is None or s in wanted for s in names], np.arange(n_src), -1)[src_of_run]
    item, concept_key, status = _placements(store, win)
    allowed = np.zeros(4, dtype=bool)
    allowed[[STATUS_CODES[s] for s in params["statuses"] if s in STATUS_CODES]] = True
    keep = allowed[status]
    source_of = _table(lo, hi, src_of_run, int(item.max(initial=-1)) + 1)  # item key -> source index, -1: none
    keys = win.keys.to_numpy(dtype=np.int64)
    concept = _table(keys, keys, np.arange(n), int(concept_key.max(initial=-1)) + 1)[concept_key]
    src = source_of[item]
    keep &= (src >= 0) & (concept >= 0)
    if not keep.all():
        item, concept, status, src = item[keep], concept[keep], status[keep], src[keep]
    if not len(item):
        return names, out
    acc = (status == STATUS_CODES["accepted"]).astype(np.int64) if by_status else np.zeros_like(item)
    starts, flat = win.targets()
    lens = starts[1:] - starts[:-1]
    single = np.bincount(item)[item] == 1  # keys are small non-negative ints (row numbers, node ids)
    # Items placed once: count per (concept, flag, source), then add each concept's counts to its targets.
    direct = np.bincount((concept[single] * 2 + acc[single]) * n_src + src[single],
                         minlength=n * 2 * n_src).reshape(n, 2, n_src)
    np.add.at(out, flat, direct[np.repeat(np.arange(n), lens)])
    # Items placed more than once: one (item, target) pair each, the strongest flag kept.
    multi = ~single
    m_item, m_conc, m_acc = item[multi], concept[multi], acc[multi]
    reps = lens[m_conc]
    pos = np.arange(int(reps.sum())) - np.repeat(np.cumsum(reps) - reps, reps) + np.repeat(starts[m_conc], reps)
    pair = np.sort((np.repeat(m_item, reps) * n + flat[pos]) * 2 + np.repeat(m_acc, reps))
    last = np.ones(len(pair), dtype=bool)  # per (item, target), the last of the sorted run has the highest flag
    last[:-1] = (pair[1:] // 2) != (pair[:-1] // 2)
    pair = pair[last]
    np.add.at(out, ((pair // 2) % n, pair % 2, source_of[pair // 2 // n]), 1)
    return names, out


def _table(lo: np.ndarray, hi: np.ndarray, value: np.ndarray, size: int) -> np.ndarray:
    """A lookup array over keys 0..size-1: value[j] for every key in run j (lo[j] <= key <= hi[j]; runs do not
    overlap), -1 elsewhere; one gather per placement is cheaper than a search or a hash lookup."""
    size = max(size, int(hi.max(initial=-1)) + 1)
    table = np.full(size, -1, dtype=np.int64)
    lens = hi - lo + 1
    table[np.repeat(lo - np.cumsum(lens) + lens, lens) + np.arange(int(lens.sum()))] = np.repeat(value, lens)
    return table


def _placements(store: Store, win: Window) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(item key, concept key, status code) of every placement; packed into one number when the keys allow."""
    if len(win) and 0 <= int(win.keys.min()) and int(win.keys.max()) < PACK_CONCEPTS:
        packed = store.frame("rollup_placements_packed")["packed"].to_numpy(dtype=np.int64)
        return packed // (4 * PACK_CONCEPTS), (packed // 4) % PACK_CONCEPTS, packed % 4
    pl = store.frame("rollup_placements")
    return (pl["item"].to_numpy(dtype=np.int64), pl["concept"].to_numpy(dtype=np.int64),
            pl["status"].to_numpy(dtype=np.int64))


def rollup_long(store: Store, *, reference: str, min_depth: int, max_depth: int, root: str = "",
                uids: Iterable[str] = (), params: dict) -> pd.DataFrame:
    """The rows `query_rollup` returns (concept_code, concept_label, depth, source, items), for the same parameters
    (see `Window`); `params` are the filter parameters (`Filters.params()`)."""
    win = Window.load(store, reference=reference, min_depth=min_depth, max_depth=max_depth, root=root, uids=uids)
    names, counts = distinct_counts(store, win, params, by_status=False)
    k, s = np.nonzero(counts[:, 0, :])
    rows = [(win.code[a], win.label[a], int(win.depth[a]), names[b], int(counts[a, 0, b]))
            for a, b in zip(k, s)]
    rows.sort(key=lambda r: (r[0], r[3]))
    return pd.DataFrame(rows, columns=LONG_COLUMNS)


def rollup_status_long(store: Store, *, reference: str, min_depth: int, max_depth: int,
                       params: dict) -> pd.DataFrame:
    """The rows `query_rollup_status` returns (concept_code, concept_label, depth, source, placed_by, items): each
    item under a concept counted once, as `accepted` when any of its placements there is accepted, else `auto`."""
    win = Window.load(store, reference=reference, min_depth=min_depth, max_depth=max_depth)
    names, counts = distinct_counts(store, win, params, by_status=True)
    k, a, s = np.nonzero(counts)
    rows = [(win.code[x], win.label[x], int(win.depth[x]), names[z], "accepted" if y else "auto", int(counts[x, y, z]))
            for x, y, z in zip(k, a, s)]
    rows.sort(key=lambda r: (r[0], r[3], r[4]))
    return pd.DataFrame(rows, columns=[*LONG_COLUMNS[:4], "placed_by", "items"])
