"""Validate a parent/child hierarchy and derive depth and label paths.

>>> h = check_hierarchy([("a", "A", []), ("b", "B", ["a"])], file="t.csv")
>>> h.depth["b"], h.path_labels["b"]
(2, ['A', 'B'])
"""

from __future__ import annotations

from dataclasses import dataclass

from pipeline.errors import BadInput, Problem


@dataclass
class Hierarchy:
    codes: list[str]
    parents: dict[str, list[str]]
    depth: dict[str, int]  # 1 = top level; shortest distance to a top node
    path_labels: dict[str, list[str]]  # labels from the top down along the first parent


def check_hierarchy(
    nodes: list[tuple[str, str, list[str]]],
    *,
    file: str,
    lines: dict[str, int] | None = None,
    what: str = "code",
) -> Hierarchy:
    """Reject duplicate codes, dangling parents, self-loops and cycles; every problem is reported at once.

    `nodes` is (code, label, parent codes). `lines` maps a code to the line it came from, for messages.
    """
    lines = lines or {}
    problems: list[Problem] = []
    labels: dict[str, str] = {}
    parents: dict[str, list[str]] = {}
    for code, label, parent_codes in nodes:
        if code in labels:
            problems.append(Problem(f"duplicate {what} {code!r}", file=file, line=lines.get(code), field=what))
            continue
        labels[code] = label
        parents[code] = list(dict.fromkeys(parent_codes))
    for code, ps in parents.items():
        for p in ps:
            if p == code:
                problems.append(Problem(f"{what} {code!r} is its own parent", file=file, line=lines.get(code)))
            elif p not in labels:
                problems.append(
                    Problem(f"{what} {code!r} has unknown parent {p!r}", file=file, line=lines.get(code))
                )
    if problems:
        raise BadInput(problems)
    cycle = _find_cycle(parents)
    if cycle:
        chain = " -> ".join(cycle)
        raise BadInput(Problem(f"cycle in hierarchy: {chain}", file=file, line=lines.get(cycle[0])))
    order = _top_down(parents)
    depth: dict[str, int] = {}
    path_labels: dict[str, list[str]] = {}
    for code in order:
        ps = parents[code]
        if not ps:
            depth[code] = 1
            path_labels[code] = [labels[code]]
        else:
            depth[code] = 1 + min(depth[p] for p in ps)
            path_labels[code] = path_labels[ps[0]] + [labels[code]]
    return Hierarchy(codes=list(labels), parents=parents, depth=depth, path_labels=path_labels)


def _find_cycle(parents: dict[str, list[str]]) -> list[str] | None:
    """Iterative depth-first search over child->parent links; returns one cycle as a list of codes."""
    state: dict[str, int] = {}  # 1 = on stack, 2 = done
    for start in parents:
        if state.get(start):
            continue
        stack = [(start, iter(parents[start]))]
        path = [start]
        state[start] = 1
        while stack:
            node, it = stack[-1]
            nxt = next(it, None)
            if nxt is None:
                state[node] = 2
                stack.pop()
                path.pop()
                continue
            s = state.get(nxt, 0)
            if s == 1:
                return path[path.index(nxt):] + [nxt]
            if s == 0:
                state[nxt] = 1
                stack.append((nxt, iter(parents[nxt])))
                path.append(nxt)
    return None


def _top_down(parents: dict[str, list[str]]) -> list[str]:
    """Codes ordered so every parent comes before its children (Kahn's algorithm; the graph is acyclic)."""
    children: dict[str, list[str]] = {c: [] for c in parents}
    pending = {c: len(ps) for c, ps in parents.items()}
    for c, ps in parents.items():
        for p in ps:
            children[p].append(c)
    queue = [c for c, n in pending.items() if n == 0]
    order = []
    while queue:
        c = queue.pop()
        order.append(c)
        for ch in children[c]:
            pending[ch] -= 1
            if pending[ch] == 0:
                queue.append(ch)
    return order
