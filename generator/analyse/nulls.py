"""Tests against chance: each statistic on degree-preserving rewirings of the network (Maslov &
Sneppen 2002), and how far the observed value lies from those values."""

from __future__ import annotations

import math
import multiprocessing
import os
import random
import statistics as stats
import sys
import threading
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass

import igraph as ig
import pandas as pd

from .communities import find_communities
from .graph import undirected_version
from .mixing import categorical_attributes, ei_index
from .seeding import seeded_igraph
from .statistics import _assortativity

__all__ = [
    "SWAPS_PER_TIE",
    "TESTED_STATISTICS",
    "NullTest",
    "SignificanceResult",
    "empirical_p",
    "null_model_tests",
    "null_seeds",
    "rewired",
]

SWAPS_PER_TIE = 10  # rewiring trials per tie: 10 x m, igraph's default and common practice
# The statistics tested, in statistics.csv order; "assortativity" stands for every
# assortativity:<attribute> row, "ei_index" for every ei_index:<attribute> row.
TESTED_STATISTICS = ("transitivity", "reciprocity", "degree_assortativity", "assortativity",
                     "ei_index", "modularity")
# Null values within this (relative) distance of the observed one count as equal to it, so that
# the same partition scored over ties listed in another order is not "more extreme".
_TOLERANCE = 1e-12
# Parallel processes pay off above roughly this many units of work (samples x community runs x
# (nodes + ties); one unit takes about 2 microseconds): below it, starting them costs more than
# they save. A forked worker starts in a fraction of a second; one that must import the
# libraries first takes a few seconds.
_PARALLEL_FROM = {"fork": 800_000, "forkserver": 6_000_000, "spawn": 10_000_000}

Progress = Callable[[int, int], None]


@dataclass(frozen=True)
class NullTest:
    """One statistic against its values on the rewired networks (a row of significance.csv).

    ``nulls`` holds the statistic on every rewired network where it is defined, in sample order;
    ``samples`` counts them. ``below`` and ``above`` count the null values lower and higher than
    the observed one. ``z`` is (observed - null_mean) / null_sd; ``p`` the two-sided empirical
    p-value (see ``empirical_p``). ``why`` names by key why z (or every null value) is missing.
    """

    statistic: str
    observed: float
    null_mean: float | None
    null_sd: float | None
    z: float | None
    p: float | None
    samples: int
    below: int
    above: int
    why: str | None
    nulls: tuple[float, ...]


@dataclass(frozen=True)
class SignificanceResult:
    """The null-model tests of one network and how they were made.

    ``samples`` rewired networks were drawn, each with ``swaps_per_tie`` x m rewiring trials and
    its own seed derived from ``seed``; ``weights_shuffled`` says whether the tie weights were
    shuffled over the new ties. ``tests`` is empty when nothing was tested, and ``why`` then
    names the reason by key ("not_requested", "no_ties").
    """

    samples: int
    seed: int
    swaps_per_tie: int
    weights_shuffled: bool
    tests: tuple[NullTest, ...]
    why: str | None = None

    def test(self, statistic: str) -> NullTest | None:
        return next((t for t in self.tests if t.statistic == statistic), None)


NOT_REQUESTED = SignificanceResult(samples=0, seed=0, swaps_per_tie=SWAPS_PER_TIE,
                                   weights_shuffled=False, tests=(), why="not_requested")


def null_seeds(seed: int, samples: int) -> list[int]:
    """Independent seeds for each rewired network, derived from the study seed."""
    rng = random.Random(f"nulls:{seed}")
    return [rng.randrange(2**31) for _ in range(samples)]


def rewired(graph: ig.Graph, *, seed: int, weighted: bool) -> ig.Graph:
    """A degree-preserving rewiring of ``graph`` (which is left as it is).

    Maslov & Sneppen's edge swap: two ties a-b and c-d become a-d and c-b, kept only if no
    self-loop or repeated tie results; 10 x m swaps are tried. Every node keeps its degree (in a
    directed network its in- and out-degree) and the network stays simple. In a weighted network
    the ties' weights (with strength and length) are then shuffled over the new ties, so the
    weights as a whole are kept but not where they sat.

    References: Maslov, S. & Sneppen, K.: Specificity and stability in topology of protein
    networks. Science 296(5569):910-913, 2002. doi:10.1126/science.1065103
    """
    copy = graph.copy()
    m = copy.ecount()
    if m >= 2:
        with seeded_igraph(seed):
            copy.rewire(n=SWAPS_PER_TIE * m, allowed_edge_types="simple")
    order = random.Random(f"weights:{seed}").sample(range(m), m) if weighted else list(range(m))
    for name in ("weight", "strength", "length"):
        values = graph.es[name]
        copy.es[name] = [values[i] for i in order]
    return copy


@dataclass(frozen=True)
class _Job:
    """Everything one sample needs; sent once to each worker process."""

    graph: ig.Graph
    weighted: bool
    attributes: pd.DataFrame
    names: tuple[str, ...]
    method: str
    resolution: float
    runs: int


def _defined(value: float | None) -> float | None:
    return None if value is None or math.isnan(value) else float(value)


def _values(graph: ig.Graph, job: _Job, community_seed: int) -> tuple[float | None, ...]:
    """Every tested statistic of ``graph``, computed as network_statistics computes it."""
    undirected = undirected_version(graph)
    directed = graph.is_directed()
    out: list[float | None] = []
    for name in job.names:
        if name == "transitivity":
            out.append(_defined(undirected.transitivity_undirected()))
        elif name == "reciprocity":
            out.append(_defined(graph.reciprocity(ignore_loops=True, mode="default"))
                       if graph.ecount() else None)
        elif name == "degree_assortativity":
            if not graph.ecount():
                out.append(None)
            elif directed:
                out.append(_defined(graph.assortativity(types1=graph.outdegree(),
                                                        types2=graph.indegree(), directed=True)))
            else:
                out.append(_defined(graph.assortativity_degree(directed=False)))
        elif name == "modularity":
            found = find_communities(undirected, method=job.method, resolution=job.resolution,
                                     runs=job.runs, seed=community_seed, weighted=job.weighted)
            out.append(_defined(found.modularity))
        elif name.startswith("ei_index:"):
            out.append(ei_index(graph, job.attributes[name.partition(":")[2]]))
        else:
            column = name.partition(":")[2]
            out.append(_assortativity(graph, job.attributes[column], name).value)
    return tuple(out)


def _sample(job: _Job, seed: int) -> tuple[float | None, ...]:
    return _values(rewired(job.graph, seed=seed, weighted=job.weighted), job, seed)


_WORKER_JOB: _Job | None = None


def _install_job(job: _Job) -> None:
    global _WORKER_JOB
    _WORKER_JOB = job


def _worker_sample(seed: int) -> tuple[float | None, ...]:
    assert _WORKER_JOB is not None, "no job"
    return _sample(_WORKER_JOB, seed)


def _start_method() -> str:
    """Fork where it is safe: on Linux, from a process with no other threads. Forking beside
    threads (the preview's server and watcher) can deadlock the child, and macOS forbids it for
    its system libraries; there a fresh server process forks the workers instead."""
    methods = multiprocessing.get_all_start_methods()
    if sys.platform.startswith("linux") and threading.active_count() == 1 and "fork" in methods:
        return "fork"
    return "forkserver" if "forkserver" in methods else "spawn"


def _automatic_workers(job: _Job, samples: int) -> int:
    cpus = os.cpu_count() or 1
    size = job.graph.vcount() + job.graph.ecount()
    runs = job.runs + 1 if "modularity" in job.names else 1
    if cpus < 2 or samples * runs * size < _PARALLEL_FROM[_start_method()]:
        return 1
    return min(cpus, samples)


def _run(job: _Job, seeds: Sequence[int], workers: int, progress: Progress | None
         ) -> list[tuple[float | None, ...]]:
    total = len(seeds)
    if workers > 1:
        try:
            return _run_parallel(job, seeds, workers, progress)
        except (OSError, NotImplementedError, BrokenProcessPool):
            pass  # no processes on this system: the same results, one after another
    results = []
    for done, seed in enumerate(seeds, start=1):
        results.append(_sample(job, seed))
        if progress is not None:
            progress(done, total)
    return results


def _run_parallel(job: _Job, seeds: Sequence[int], workers: int, progress: Progress | None
                  ) -> list[tuple[float | None, ...]]:
    method = _start_method()
    context = multiprocessing.get_context(method)
    if method == "forkserver":
        context.set_forkserver_preload([__name__])  # import the libraries once, not per worker
    results: list[tuple[float | None, ...] | None] = [None] * len(seeds)
    workers = min(workers, len(seeds), os.cpu_count() or 1)
    with ProcessPoolExecutor(max_workers=workers, mp_context=context,
                             initializer=_install_job, initargs=(job,)) as pool:
        futures = {pool.submit(_worker_sample, seed): i for i, seed in enumerate(seeds)}
        for done, future in enumerate(as_completed(futures), start=1):
            results[futures[future]] = future.result()
            if progress is not None:
                progress(done, len(seeds))
    return [r for r in results if r is not None]


def empirical_p(observed: float, nulls: Sequence[float]) -> float:
    """Two-sided empirical p-value: (k + 1) / (N + 1), where k counts the N null values at least
    as far from their mean as the observed value is, |null - mean| >= |observed - mean|.

    The +1 counts the observed network as one draw of the null, so p is never 0 (North,
    Curtis & Sham 2002); with N samples the smallest possible p is 1 / (N + 1). Values within
    10^-12 (relative) of the observed distance count as equally far.

    References: North, B. V., Curtis, D. & Sham, P. C.: A note on the calculation of empirical P
    values from Monte Carlo procedures. American Journal of Human Genetics 71(2):439-441, 2002.
    doi:10.1086/341527
    """
    mean = stats.fmean(nulls)
    distance = abs(observed - mean)
    slack = _TOLERANCE * max(1.0, abs(observed))
    k = sum(1 for x in nulls if abs(x - mean) >= distance - slack)
    return (k + 1) / (len(nulls) + 1)


def _test(name: str, observed: float, values: list[float | None]) -> NullTest:
    nulls = tuple(v for v in values if v is not None)
    n = len(nulls)
    if n == 0:
        return NullTest(name, observed, None, None, None, None, 0, 0, 0, "undefined_in_nulls",
                        ())
    mean = stats.fmean(nulls)
    sd = stats.stdev(nulls, mean) if n > 1 else None
    slack = _TOLERANCE * max(1.0, abs(observed))
    below = sum(1 for x in nulls if x < observed - slack)
    above = sum(1 for x in nulls if x > observed + slack)
    z = None
    why = None
    if sd is None:
        why = "one_null_sample"
    elif sd <= _TOLERANCE * max(1.0, abs(mean)):
        sd, why = 0.0, "no_null_variance"
    else:
        z = (observed - mean) / sd
    return NullTest(name, observed, mean, sd, z, empirical_p(observed, nulls), n, below, above,
                    why, nulls)


def null_model_tests(graph: ig.Graph, *, weighted: bool, attributes: pd.DataFrame, method: str,
                     resolution: float, runs: int, samples: int, seed: int,
                     progress: Progress | None = None, workers: int | None = None
                     ) -> SignificanceResult:
    """Test transitivity, reciprocity (directed), degree assortativity, each attribute's
    assortativity, each categorical attribute's E-I index and modularity against ``samples``
    degree-preserving rewirings of ``graph``.

    Each rewired network (see ``rewired``) has its own seed from ``null_seeds(seed, samples)``;
    modularity on it comes from the same community method, resolution and number of runs as the
    observed partition, rerun with that sample's seed. A statistic undefined on the observed
    network is not tested. ``progress(done, samples)`` is called as samples finish.

    ``workers`` None runs the samples in parallel processes (at most one per CPU) when the work
    is large enough to pay for starting them; 1 runs them here. Every sample depends only on its
    seed, so the results are the same either way, and the same for any number of processes.
    """
    if samples <= 0:
        return NOT_REQUESTED
    if graph.ecount() == 0:
        return SignificanceResult(samples, seed, SWAPS_PER_TIE, weighted, (), "no_ties")
    names = [n for n in TESTED_STATISTICS[:3] if n != "reciprocity" or graph.is_directed()]
    names += [f"assortativity:{column}" for column in attributes.columns]
    names += [f"ei_index:{column}" for column in categorical_attributes(attributes)]
    names.append("modularity")
    job = _Job(graph, weighted, attributes, tuple(names), method, resolution, runs)
    observed = _values(graph, job, seed)  # modularity: the partition the analysis reports
    kept = tuple(n for n, v in zip(names, observed) if v is not None)
    job = _Job(graph, weighted, attributes, kept, method, resolution, runs)
    seeds = null_seeds(seed, samples)
    chosen = _automatic_workers(job, samples) if workers is None else workers
    results = _run(job, seeds, chosen, progress)
    observed_kept = [v for v in observed if v is not None]
    tests = tuple(_test(name, value, [r[i] for r in results])
                  for i, (name, value) in enumerate(zip(kept, observed_kept)))
    return SignificanceResult(samples, seed, SWAPS_PER_TIE, weighted, tests)
