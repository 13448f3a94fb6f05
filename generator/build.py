"""Run the stages in order: config -> ingest -> analyse -> draw -> render -> publish.

This is the only module that knows every stage."""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import os
import shutil
import sys
import threading
import time
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, TextIO

import pandas as pd
from tqdm import tqdm  # type: ignore[import-untyped]  # tqdm ships no annotations

from . import __version__
from .analyse import NetworkAnalysis, analyse_network
from .analyse.across import study_table
from .analyse.compare import compare_relations, compare_series
from .analyse.two_mode import analyse_two_mode, project
from .cache import CACHE_DIR, CACHE_TAG, ResultCache, analysis_key, figures_key, remove_cache
from .config import (
    CommunitiesConfig,
    MeasuresConfig,
    NetworkConfig,
    SignificanceConfig,
    StudyConfig,
    check_relation_data,
    load_study,
)
from .draw import Figure, FigureSettings, draw_network
from .draw.across import draw_study_spread
from .draw.compare import draw_community_flow, draw_series_statistics
from .draw.ego import ego_figures
from .draw.explorer import explorer_data
from .draw.two_mode import draw_two_mode
from .errors import ConfigError, DataError, Finding, OutputError
from .ingest import CleanNetwork, read_network
from .ingest.two_mode import TwoModeNetwork, read_two_mode
from .publish import (
    MARKER,
    all_data_zip,
    check_output_folder,
    datapackage_json,
    network_files,
    write_site,
)
from .publish.archive import zip_time
from .publish.downloads import study_statistics_csv, study_statistics_resource
from .publish.lock import LockOwner, hold_study_lock
from .publish.relations import relation_files, relation_resources
from .publish.series import series_files, series_resources
from .publish.site import recover_interrupted_site
from .publish.two_mode import two_mode_files, two_mode_resources
from .render import NetworkPageInput, render_site
from .render.compare import SeriesInput, series_title
from .render.methods import scaled_sentence
from .render.node_view import node_view_limit
from .render.overview import StudyOverview
from .render.relations_page import RelationsInput
from .render.site import PartnerCopy, note_images, render_notes
from .render.site_map import (
    ALL_DATA,
    DATAPACKAGE,
    STUDY_STATISTICS,
    compare_figure,
    explorer_file,
    study_figure,
)
from .render.theme import load_theme
from .render.two_mode_page import TwoModeInput
from .schedule import Workers, default_jobs, run_in_order, worker_pool
from .vocabulary import count_of

__all__ = ["BuildResult", "Progress", "Rebuilder", "Workers", "build_info_stamp", "build_study",
           "check_study", "clean_study", "read_notes", "read_text", "site_files", "study_analyses",
           "study_relations", "study_results", "workers_for"]


class Progress:
    """One line per stage on stderr, with counts and timing; silent when ``quiet``."""

    def __init__(self, stream: TextIO | None = None, *, quiet: bool = False):
        self.stream = stream if stream is not None else sys.stderr
        self.quiet = quiet
        self._start = time.perf_counter()

    def warn(self, message: str) -> None:
        """A warning line; shown even when quiet."""
        print(f"warning  {message}", file=self.stream, flush=True)

    def stage(self, name: str, message: str) -> None:
        if self.quiet:
            return
        elapsed = time.perf_counter() - self._start
        print(f"{name:<8} {message} ({elapsed:.2f} s)", file=self.stream, flush=True)
        self._start = time.perf_counter()

    def step(self, name: str, message: str) -> None:
        """A line on the way through a long stage; the stage's clock keeps running."""
        if not self.quiet:
            print(f"{name:<8} {message}", file=self.stream, flush=True)

    def counter(self, name: str, label: str, unit: str, *, after: float = 0.0
                ) -> Callable[[int, int], None]:
        """Follows a long stage as ``report(done, total)`` calls: on a terminal a progress bar
        with the count, the rate and the time left (tqdm); otherwise a plain line each quarter
        of the way, with the time left estimated from the pace so far. Nothing is shown until
        ``after`` seconds have passed (quick stages stay quiet)."""
        bar: Any = None
        started = time.perf_counter()

        def report(done: int, total: int) -> None:
            nonlocal bar
            if self.quiet or time.perf_counter() - started < after:
                return
            if self.stream.isatty():
                if bar is None:
                    bar = tqdm(total=total, desc=f"{name:<8} {label}", unit=f" {unit}",
                               file=self.stream, leave=False, dynamic_ncols=True)
                bar.update(done - bar.n)
                if done >= total:
                    bar.close()
                    self.step(name, f"{label}: {done}/{total} {unit}")
                return
            if done == total or done % max(1, total // 4) == 0:
                left = ""
                if 0 < done < total:
                    seconds = (time.perf_counter() - started) / done * (total - done)
                    left = f", about {seconds:.0f} s left"
                self.step(name, f"{label}: {done}/{total} {unit}{left}")
        return report

    def samples(self, network_id: str) -> Callable[[int, int], None]:
        """Reports null samples done for one network."""
        return self.counter("significance", network_id, "samples")

    def perturbations(self, network_id: str) -> Callable[[int, int], None]:
        """Reports community reruns on perturbed ties done for one network."""
        return self.counter("stability", network_id, "perturbed reruns")

    def runs(self, network_id: str) -> Callable[[int, int], None]:
        """Reports the community runs done for one network."""
        return self.counter("communities", network_id, "runs", after=2.0)


@dataclass
class BuildResult:
    """What a build did: the files it wrote and the analyses of every network; a build that
    found nothing changed (``up_to_date``) wrote nothing and holds no analyses."""

    study: StudyConfig
    output: Path
    files: int
    networks: list[NetworkAnalysis] = field(default_factory=list)
    up_to_date: bool = False
    # Seconds by stage: wall-clock in this process, except "analyse" and "draw", which are the
    # sums over networks of the time spent on them wherever they ran (workers included).
    timings: dict[str, float] = field(default_factory=dict)


def _site_key(study: StudyConfig, keys: dict[str, str], notes: dict[str, str],
              summary: str | None, build_info: dict[str, str]) -> str:
    """Everything the site's bytes depend on beyond the networks' own keys: the figure settings,
    study.toml, the notes, the theme and the build stamp."""
    digest = hashlib.sha256()
    parts: list[object] = [
        sorted(keys.items()),
        [(net.id, figures_key(keys[net.id], _figure_settings(net))) for net in study.networks],
        hashlib.sha256(study.study_file.read_bytes()).hexdigest(),
        sorted(notes.items()), summary, build_info, load_theme(study).digest(),
        [(study.relative(path), hashlib.sha256(path.read_bytes()).hexdigest())
         for path in note_images(study)],
    ]
    digest.update(json.dumps(parts, sort_keys=True, default=str).encode("utf-8"))
    return digest.hexdigest()


def _figure_settings(net: NetworkConfig) -> FigureSettings:
    return FigureSettings(color_by=net.color_by, size_by=net.size_by)


def _read_all(study: StudyConfig, progress: Progress, *, skip: Iterable[str] = ()
              ) -> dict[str, CleanNetwork]:
    """Read every network (but those in ``skip``), collecting the errors of all of them before
    giving up."""
    cleaned: dict[str, CleanNetwork] = {}
    errors: list[Finding] = []
    skipped = set(skip)
    two_mode: dict[str, TwoModeNetwork | None] = {}
    for net in study.networks:
        if net.id in skipped:
            continue
        try:
            if net.projected_from is not None:
                if net.projected_from in two_mode:  # its errors are listed once
                    parent = two_mode[net.projected_from]
                    if parent is None:
                        continue
                else:
                    two_mode[net.projected_from] = None
                    parent = read_two_mode(study, _two_mode_config(study, net.projected_from))
                    two_mode[net.projected_from] = parent
                clean = project(parent, net)
            else:
                clean = read_network(study, net)
        except DataError as exc:
            errors += exc.findings
            continue
        cleaned[net.id] = clean
        fixes = sum(1 for f in clean.checks.findings if f.level == "fix")
        progress.stage("ingest", f"{net.id}: {count_of(len(clean.nodes), 'node')}, "
                       f"{count_of(len(clean.edges), 'tie')}, {count_of(fixes, 'fix', 'fixes')}")
    if errors:
        raise DataError(errors)
    return cleaned


def _two_mode_config(study: StudyConfig, network_id: str) -> NetworkConfig:
    return next(net for net in study.two_mode if net.id == network_id)


def _two_mode_inputs(study: StudyConfig, analyses: list[NetworkAnalysis], progress: Progress
                     ) -> list[TwoModeInput]:
    """Each two-mode network read, analysed and drawn; cheap beside its projections, so it is
    not cached."""
    inputs = []
    for net in study.two_mode:
        analysis = analyse_two_mode(read_two_mode(study, net), seed=study.seed)
        projected = {a.network_id.removeprefix(f"{net.id}-"): len(a.edges) > 0
                     for a in analyses if a.network_id in {f"{net.id}-{m}" for m in net.modes}}
        files = tuple(study.relative(p) for p in (net.data_file, net.nodes) if p is not None)
        inputs.append(TwoModeInput(analysis=analysis, figures=[draw_two_mode(analysis)],
                                   files=files, projected=projected))
        for mode, tied in projected.items():
            if not tied:
                progress.warn(f"{net.id}: no two {mode} nodes share a node of the other mode, so "
                              f"the projection {net.id}-{mode} has no ties")
        progress.stage("analyse", f"{net.id}: two-mode, projections "
                       f"{', '.join(f'{net.id}-{m}' for m in net.modes)}")
    return inputs


def read_notes(study: StudyConfig) -> tuple[dict[str, str], str | None]:
    """Every notes/*.md and the summary; the errors of all of them before giving up."""
    notes: dict[str, str] = {}
    errors: list[Finding] = []
    folder = study.root / "notes"
    if folder.is_dir():
        for path in sorted(folder.glob("*.md")):
            try:
                inside = path.resolve().is_relative_to(study.root)
            except (OSError, RuntimeError):  # a link that leads back to itself
                errors.append(Finding("error", study.relative(path), "is a link that never "
                                      "reaches a file (it leads back to itself)"))
                continue
            if not inside:
                raise ConfigError(f"note {path.name} links outside the study folder", key="notes")
            try:
                notes[path.stem] = read_text(path, study)
            except DataError as exc:
                errors += exc.findings
    if errors:
        raise DataError(errors)
    summary = read_text(study.summary, study) if study.summary else None
    return notes, summary


def read_text(path: Path, study: StudyConfig) -> str:
    try:
        return path.read_text(encoding="utf-8-sig")
    except UnicodeDecodeError as exc:
        line = path.read_bytes()[: exc.start].count(b"\n") + 1
        raise DataError(Finding("error", study.relative(path), "is not UTF-8 text; save it as "
                                "UTF-8", line=line)) from None
    except IsADirectoryError:
        raise DataError(Finding("error", study.relative(path), "is a folder, not a markdown file; "
                                "rename it or move it out of notes/")) from None
    except FileNotFoundError:  # listed, yet gone: a link whose target does not exist
        target = os.readlink(path) if path.is_symlink() else None
        raise DataError(Finding("error", study.relative(path), "is a link to a file that does "
                                "not exist; remove the link or restore its target",
                                value=target)) from None
    except OSError as exc:
        raise DataError(Finding("error", study.relative(path),
                                f"cannot be read: {exc.strerror or exc}")) from None


def build_info_stamp() -> dict[str, str]:
    # No wall-clock time unless SOURCE_DATE_EPOCH asks for one, so rebuilds are byte-identical.
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    built = ""
    if epoch and epoch.strip().isdigit():
        built = dt.datetime.fromtimestamp(int(epoch), tz=dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    return {"netfolio": __version__, "built": built}


def check_study(project: Path | str, *, report: Callable[[Finding], None]) -> StudyConfig:
    """Validate config and data without building; pass every finding to ``report``."""
    study = load_study(project)
    # The errors of every network and of every note are raised together, not the first file's.
    errors: list[Finding] = []
    try:
        cleaned = _read_all(study, Progress(quiet=True))
    except DataError as exc:
        errors, cleaned = list(exc.findings), {}
    try:
        notes, summary = read_notes(study)
    except DataError as exc:
        errors += exc.findings
    if errors:
        raise DataError(errors)
    _check_relations(study, list(cleaned.values()))
    for clean in cleaned.values():
        for finding in clean.checks.findings:
            report(finding)
    for finding in render_notes(study, notes, summary).findings:  # a note too deep fails here
        report(finding)
    load_theme(study).check_templates()  # an unknown or broken theme fails here as in build
    check_output_folder(study.output, _input_files(study, notes))
    return study


def _input_files(study: StudyConfig, notes: dict[str, str]) -> list[Path]:
    files = [p for net in study.networks for p in (net.data_file, net.nodes) if p is not None]
    return (files + [study.study_file] + [study.root / "notes" / f"{stem}.md" for stem in notes]
            + note_images(study))


def build_study(project: Path | str, *, output: Path | None = None,
                progress: Progress | None = None, fresh: bool = False,
                workers: Workers | None = None) -> BuildResult:
    """Build the whole site; the previous site stays untouched unless every stage succeeds.

    Results of unchanged networks come from ``<study>/.netfolio-cache/``; ``fresh`` ignores it
    and writes it anew. ``workers`` says where networks are analysed and drawn (default: one
    process per core, or the study's ``[build] cluster``); the site is the same bytes anywhere."""
    return Rebuilder(project, output=output, progress=progress, keep_results=False,
                     workers=workers).build(fresh=fresh)


def workers_for(study: StudyConfig, asked: Workers | None) -> Workers:
    """``--cluster`` first, then ``--jobs``, then ``[build] cluster``, then a process per core."""
    if asked is not None and (asked.cluster is not None or asked.jobs is not None):
        return asked
    if study.build.cluster is not None:
        return Workers(cluster=study.build.cluster, cluster_source="build.cluster")
    return Workers(jobs=default_jobs())


class Rebuilder:
    """Builds one study, again and again if asked (the preview does), keeping the results of
    each build in memory so the next one redoes only what an edit changed."""

    def __init__(self, project: Path | str, *, output: Path | None = None,
                 progress: Progress | None = None, keep_results: bool = True,
                 workers: Workers | None = None):
        self.project = project
        self.output = output
        self.progress = progress or Progress(quiet=True)
        self.keep_results = keep_results
        self.workers = workers
        self.builds = 0  # finished builds
        self._cache: ResultCache | None = None

    def build(self, *, fresh: bool = False) -> BuildResult:
        """One build; raises as ``build_study`` does, leaving the last site untouched."""
        study = load_study(self.project)
        if self.output is not None:
            study = _with_output(study, self.output)
        # One build of a study at a time: two at once raced over the swap of the site folder.
        with hold_study_lock(study.root, on_wait=_report_waiting(self.progress)):
            # A build killed between its two renames left the last site aside; put it back
            # first, so it is in place even if this build then stops on bad data.
            recover_interrupted_site(study.output)
            # The first build of a preview writes the site even when it is up to date, so its
            # results are in memory for the edits that follow.
            result = _build_holding_lock(study, self.progress, self._cache_for(study, fresh),
                                         skip_if_current=self.builds > 0 or not self.keep_results,
                                         workers=workers_for(study, self.workers))
        self.builds += 1
        return result

    def _cache_for(self, study: StudyConfig, fresh: bool) -> ResultCache:
        folder = study.root / CACHE_DIR
        if self._cache is None or self._cache.folder != folder:
            self._cache = ResultCache(folder, warn=self.progress.warn)
        self._cache.begin_build(fresh=fresh)
        return self._cache


def _report_waiting(progress: Progress) -> Callable[[LockOwner], None]:
    def waiting(owner: LockOwner) -> None:
        progress.stage("lock", f"waiting for the build of process {owner.pid} on {owner.host} "
                       f"(since {owner.since_text()}) to finish")
    return waiting


def _build_holding_lock(study: StudyConfig, progress: Progress, cache: ResultCache, *,
                        skip_if_current: bool = True, workers: Workers | None = None
                        ) -> BuildResult:
    """Every stage after config load; the caller holds the study's lock.

    A network whose inputs, settings and versions are unchanged is taken from the cache, neither
    read, analysed nor drawn again; the site is the same bytes either way."""
    progress.stage("config", f"read {study.study_file.name}: {count_of(len(study.networks), 'network')}")
    keys = {net.id: analysis_key(study, net) for net in study.networks}
    notes, summary = read_notes(study)
    build_info = build_info_stamp()
    site_key = _site_key(study, keys, notes, summary, build_info)
    if skip_if_current and cache.site_is_current(study.output, site_key):
        for net in study.networks:
            progress.stage("analyse", f"{net.id}: cached")
        progress.stage("publish", f"nothing changed: {study.output} is up to date")
        return BuildResult(study=study, output=study.output, files=0, up_to_date=True)
    timings: dict[str, float] = {}
    analyses, drawn = study_results(study, keys, progress, cache,
                                    workers=workers or Workers(jobs=1), timings=timings)
    start = time.perf_counter()
    files = site_files(study, analyses, keys, notes=notes, summary=summary,
                       build_info=build_info, progress=progress, cache=cache, drawn=drawn)
    timings["render"] = time.perf_counter() - start
    start = time.perf_counter()
    count = write_site(study.output, files, inputs=_input_files(study, notes))
    cache.record_site(study.output, site_key)
    cache.prune()
    timings["publish"] = time.perf_counter() - start
    size = sum(len(b) for b in files.values())
    progress.stage("publish", f"wrote {count} files ({size / 1e6:.1f} MB) to {study.output}")
    return BuildResult(study=study, output=study.output, files=count, networks=analyses,
                       timings=timings)


def study_analyses(study: StudyConfig, keys: dict[str, str], progress: Progress,
                   cache: ResultCache, *, workers: Workers | None = None
                   ) -> list[NetworkAnalysis]:
    """The analysis of every network, in study order: from the cache where the network's key
    (``keys``, from ``analysis_key``) is there, else read, checked and computed (and stored)."""
    analyses, _ = study_results(study, keys, progress, cache, workers=workers or Workers(jobs=1),
                                draw=False)
    return analyses


@dataclass(frozen=True, kw_only=True)
class _NetworkTask:
    """One network's work for a worker: analyse ``clean`` (unless ``analysis`` is given, from
    the cache), then draw the figures with ``settings`` (unless None: they are cached)."""

    network_id: str
    clean: CleanNetwork | None
    analysis: NetworkAnalysis | None
    settings: FigureSettings | None
    communities: CommunitiesConfig
    measures: MeasuresConfig
    significance: SignificanceConfig
    seed: int
    in_worker: bool  # its rewired-network samples then run one after another, not in processes


@dataclass(frozen=True, kw_only=True)
class _NetworkWork:
    analysis: NetworkAnalysis
    figures: list[Figure] | None
    analyse_seconds: float
    draw_seconds: float
    analysed: bool  # False: the analysis came with the task, from the cache


# One network at a time per process: the analysis seeds igraph's process-wide random generator
# and matplotlib is not thread-safe, so a cluster worker running several threads must not
# interleave two networks.
_ONE_NETWORK_AT_A_TIME = threading.Lock()


def _network_work(task: _NetworkTask, progress: Progress | None = None) -> _NetworkWork:
    """Analyse and draw one network; runs in a worker process or on a cluster worker, so it
    takes and returns plain values only (``progress`` only when it runs in this process)."""
    with _ONE_NETWORK_AT_A_TIME:
        start = time.perf_counter()
        analysis = task.analysis
        if analysis is None:
            assert task.clean is not None
            analysis = analyse_network(
                task.clean, communities=task.communities, measures=task.measures, seed=task.seed,
                significance=task.significance,
                progress=progress.samples(task.network_id) if progress else None,
                stability_progress=progress.perturbations(task.network_id) if progress else None,
                runs_progress=progress.runs(task.network_id) if progress else None,
                null_workers=1 if task.in_worker else None)
        drawn = time.perf_counter()
        figures = draw_network(analysis, task.settings) if task.settings is not None else None
        return _NetworkWork(analysis=analysis, figures=figures,
                            analyse_seconds=drawn - start,
                            draw_seconds=time.perf_counter() - drawn,
                            analysed=task.analysis is None)


def study_results(study: StudyConfig, keys: dict[str, str], progress: Progress,
                  cache: ResultCache, *, workers: Workers, draw: bool = True,
                  timings: dict[str, float] | None = None
                  ) -> tuple[list[NetworkAnalysis], dict[str, list[Figure]]]:
    """The analysis and (when ``draw``) the figures of every network, in study order.

    What the cache holds is taken from it and never sent to a worker; the rest is read and
    checked here (so every network's errors are listed together), then analysed and drawn
    where ``workers`` says, and stored in the cache here as each network finishes."""
    timings = timings if timings is not None else {}
    start = time.perf_counter()
    analyses: dict[str, NetworkAnalysis] = {}
    figures: dict[str, list[Figure]] = {}
    figure_keys = {net.id: figures_key(keys[net.id], _figure_settings(net))
                   for net in study.networks}
    for net in study.networks:
        found = cache.analysis(keys[net.id])
        if found is not None:
            analyses[net.id] = found
        cached_figures = cache.figures(figure_keys[net.id]) if draw else None
        if cached_figures is not None:
            figures[net.id] = cached_figures
    cleaned = _read_all(study, progress, skip=set(analyses))
    timings["ingest"] = time.perf_counter() - start
    needed = [net for net in study.networks
              if net.id not in analyses or (draw and net.id not in figures)]
    in_worker = workers.cluster is not None or min(workers.processes, len(needed)) > 1
    tasks = [_NetworkTask(network_id=net.id, clean=cleaned.get(net.id),
                          analysis=analyses.get(net.id),
                          settings=_figure_settings(net) if draw and net.id not in figures else None,
                          communities=study.communities, measures=study.measures,
                          significance=study.significance, seed=study.seed, in_worker=in_worker)
             for net in needed]
    for net in study.networks:
        if net.id in analyses:
            progress.stage("analyse", f"{net.id}: cached")
        if net.id in figures:
            progress.stage("draw", f"{net.id}: cached")
    finished = 0

    def store(index: int, work: _NetworkWork) -> None:
        nonlocal finished
        finished += 1
        task = tasks[index]
        done = f"[{finished}/{len(tasks)}]"
        if work.analysed:
            cache.store_analysis(keys[task.network_id], work.analysis)
            found = work.analysis
            if found.scaled:
                progress.step("analyse", f"{task.network_id}: {scaled_sentence(found)}")
            progress.stage("analyse", f"{task.network_id}: "
                           f"{count_of(len(found.measures.columns), 'measure')}, "
                           f"{count_of(found.communities.count, 'community', 'communities')} "
                           f"{done}")
        if work.figures is not None:
            cache.store_figures(figure_keys[task.network_id], work.figures)
            progress.stage("draw", f"{task.network_id}: {count_of(len(work.figures), 'figure')}"
                           f" {done}")

    start = time.perf_counter()
    with worker_pool(workers, len(tasks)) as executor:
        if executor is not None:
            progress.step("analyse", f"{count_of(len(tasks), 'network')} to analyse and draw "
                          f"{workers.describe()}")
        if executor is None:
            def function(task: _NetworkTask) -> _NetworkWork:
                return _network_work(task, progress)
        else:
            function = _network_work
        done = run_in_order(function, tasks, executor=executor, on_done=store)
    timings["workers"] = time.perf_counter() - start
    timings["analyse"] = sum(w.analyse_seconds for w in done if w.analysed)
    timings["draw"] = sum(w.draw_seconds for w in done)
    for task, work in zip(tasks, done):
        analyses[task.network_id] = work.analysis
        if work.figures is not None:
            figures[task.network_id] = work.figures
    return [analyses[net.id] for net in study.networks], figures


def _draw_all(tasks: list[_NetworkTask], workers: Workers, progress: Progress
              ) -> list[list[Figure]]:
    """The figures of each task's analysis (given with it), drawn where ``workers`` says."""

    def drew(index: int, work: _NetworkWork) -> None:
        assert work.figures is not None
        progress.stage("draw", f"{tasks[index].network_id}: "
                       f"{count_of(len(work.figures), 'figure')}")

    with worker_pool(workers, len(tasks)) as executor:
        done = run_in_order(_network_work, tasks, executor=executor, on_done=drew)
    return [work.figures or [] for work in done]


def site_files(study: StudyConfig, analyses: list[NetworkAnalysis], keys: dict[str, str], *,
               notes: dict[str, str], summary: str | None, build_info: dict[str, str],
               progress: Progress, cache: ResultCache | None,
               partner: PartnerCopy | None = None,
               relations: list[RelationsInput] | None = None,
               drawn: dict[str, list[Figure]] | None = None,
               workers: Workers | None = None) -> dict[str, bytes]:
    """Every file of the site but the marker and manifest: figures, pages and downloads.
    ``cache`` None draws and writes everything anew and keeps nothing. ``partner`` makes a
    partner copy (pass ``cache`` None with it): its notice on every page, its sharing page,
    and network maps that name nodes only if ``partner.labels``. ``relations`` are the
    comparisons of networks on the same nodes; None computes them from ``analyses`` (a
    partner copy passes them computed from the full analyses, node ids then coded).
    ``drawn``: figures already drawn (by ``study_results``), by network id; the others are
    drawn here."""
    inputs = []
    files: dict[str, bytes] = {}
    shown: dict[str, str] = {}  # per network: the key of what its pages show
    every_figure: dict[str, list[Figure]] = {}
    missing: list[_NetworkTask] = []
    for net, analysis in zip(study.networks, analyses):
        settings = _figure_settings(net)
        if partner is not None:
            settings = replace(settings, labels=partner.labels)
        figure_key = figures_key(keys[net.id], settings)
        shown[net.id] = figure_key  # it holds the analysis key too
        figures = (drawn or {}).get(net.id) if partner is None else None
        if figures is None and cache is not None:
            figures = cache.figures(figure_key)
            if figures is not None:
                progress.stage("draw", f"{net.id}: cached")
        if figures is None:
            missing.append(_NetworkTask(
                network_id=net.id, clean=None, analysis=analysis, settings=settings,
                communities=study.communities, measures=study.measures,
                significance=study.significance, seed=study.seed, in_worker=True))
        else:
            every_figure[net.id] = figures
    for task, figures in zip(missing, _draw_all(missing, workers or Workers(jobs=1), progress)):
        every_figure[task.network_id] = figures
        if cache is not None:
            assert task.settings is not None
            cache.store_figures(figures_key(keys[task.network_id], task.settings), figures)
    for net, analysis in zip(study.networks, analyses):
        settings = _figure_settings(net)
        if partner is not None:
            settings = replace(settings, labels=partner.labels)
        figures = every_figure[net.id]
        explorer = explorer_data(analysis, settings)
        if explorer is not None:
            files[explorer_file(analysis.network_id)] = explorer.script()
        ego = None
        if len(analysis.nodes) <= node_view_limit(study.site.node_views):
            ego = tuple(ego_figures(analysis, settings))
        inputs.append(NetworkPageInput(config=net, analysis=analysis, figures=figures,
                                       explorer=explorer, ego=ego))
        for figure in figures:
            base = f"networks/{analysis.network_id}/figures/{figure.name}"
            files[base + ".svg"] = figure.svg
            files[base + ".png"] = figure.png

    for net, analysis in zip(study.networks, analyses):
        downloads = cache.files(keys[net.id]) if cache is not None else None
        if downloads is None:
            downloads = network_files(analysis)
            if cache is not None:
                cache.store_files(keys[net.id], downloads)
        files.update(downloads)
    two_mode: list[TwoModeInput] = []
    if partner is None:
        two_mode = _two_mode_inputs(study, analyses, progress)
    elif study.two_mode:  # its ids and labels come straight from the files, unprotected
        progress.warn("the two-mode networks' own pages and files are left out of partner "
                      "copies; their projections are included, protected as every network is")
    for two in two_mode:
        files.update(two_mode_files(two.analysis))
        for figure in two.figures:
            base = f"networks/{two.id}/figures/{figure.name}"
            files[base + ".svg"] = figure.svg
            files[base + ".png"] = figure.png
    series = study_series(study, analyses, progress)
    if relations is None:
        relations = study_relations(study, analyses, progress)
    resources = [r for two in two_mode for r in two_mode_resources(two.analysis)]
    by_id = {a.network_id: a for a in analyses}
    for compared in series:
        name = compared.comparison.series
        files.update(series_files(compared.comparison, by_id))
        resources += series_resources(compared.comparison, by_id)
        for figure in compared.figures:
            files[compare_figure(name, figure.name, "svg")] = figure.svg
            files[compare_figure(name, figure.name, "png")] = figure.png
    for relation in relations:
        files.update(relation_files(relation.comparison))
        resources += relation_resources(relation.comparison, relation.title)
    table = study_table(analyses)
    files[STUDY_STATISTICS] = study_statistics_csv(table)
    resources.insert(0, study_statistics_resource(table, STUDY_STATISTICS.removeprefix("files/")))
    spread_figure = draw_study_spread(table, study.title)
    if spread_figure is not None:
        files[study_figure(spread_figure.name, "svg")] = spread_figure.svg
        files[study_figure(spread_figure.name, "png")] = spread_figure.png
    files[DATAPACKAGE] = datapackage_json(analyses, title=study.title, extra=resources)
    files[ALL_DATA] = all_data_zip(files, date_time=zip_time(os.environ.get("SOURCE_DATE_EPOCH")))

    reuse = None
    if cache is not None:
        reuse = cache.page_reuse
        reuse.networks = shown
    pages = render_site(study, inputs, notes=notes, summary=summary, build_info=build_info,
                        reuse=reuse, partner=partner,
                        sizes={path: len(data) for path, data in files.items()},
                        series=series, two_mode=two_mode, relations=relations,
                        overview=StudyOverview(table, spread_figure))
    progress.stage("render", f"{sum(1 for p in pages if p.endswith('.html'))} pages")
    files.update(pages)
    return files


def study_series(study: StudyConfig, analyses: list[NetworkAnalysis], progress: Progress
                 ) -> list[SeriesInput]:
    """Every series with two or more waves: its comparison and figures, in order of first use."""
    members: dict[str, list[tuple[int, NetworkAnalysis]]] = {}
    for net, analysis in zip(study.networks, analyses):
        if net.series is not None and net.wave is not None:
            members.setdefault(net.series, []).append((net.wave, analysis))
    titles = {net.id: net.title for net in study.networks}
    found = []
    for name, waves in members.items():
        if len(waves) < 2:
            continue
        comparison = compare_series(name, waves)
        figures = [f for f in [draw_series_statistics(comparison, series_title(name))] if f]
        figures += [draw_community_flow(flow, titles[flow.earlier], titles[flow.later])
                    for flow in comparison.flows]
        found.append(SeriesInput(comparison, tuple(figures)))
        progress.stage("compare", f"{name}: {count_of(len(waves), 'wave')}")
    return found


def study_relations(study: StudyConfig, analyses: list[NetworkAnalysis], progress: Progress
                    ) -> list[RelationsInput]:
    """Every ``[[relations]]`` table compared, in study order; raises a ConfigError naming the
    line of study.toml when its networks are not on the same nodes or its model names an
    attribute they lack. Quick (a fraction of a second for a few hundred nodes), so not cached;
    every permutation derives from the study seed."""
    if not study.relations:
        return []
    _check_relations(study, analyses)
    by_id = {a.network_id: a for a in analyses}
    found = []
    for relation in study.relations:
        model = relation.model
        comparison = compare_relations(
            relation.id, [by_id[i] for i in relation.networks],
            permutations=relation.permutations, seed=study.seed,
            outcome=model.outcome if model else None,
            predictors=model.predictors if model else (), same=model.same if model else (),
            difference=model.difference if model else ())
        found.append(RelationsInput(comparison, relation.title))
        progress.stage("compare", f"{relation.id}: {count_of(len(relation.networks), 'network')}"
                       f", {count_of(relation.permutations, 'permutation')}")
    return found


def _check_relations(study: StudyConfig, networks: list[CleanNetwork] | list[NetworkAnalysis]
                     ) -> None:
    """The node sets and attributes the ``[[relations]]`` tables rely on (see
    ``config.check_relation_data``)."""
    if not study.relations:
        return
    node_ids: dict[str, frozenset[str]] = {}
    attributes: dict[str, dict[str, str]] = {}
    for net in networks:
        net_id = net.id if isinstance(net, CleanNetwork) else net.network_id
        node_ids[net_id] = frozenset(str(n) for n in net.nodes.index)
        kinds = {}
        for column in net.attributes:
            values = net.nodes[column]
            numeric = pd.api.types.is_numeric_dtype(values.dtype)
            kinds[column] = "text" if not numeric else "gaps" if values.isna().any() else "number"
        attributes[net_id] = kinds
    check_relation_data(study, node_ids, attributes)


def clean_study(project: Path | str) -> list[Path]:
    """Remove the study's cache and its site, each only if netfolio's marker says netfolio made
    it; returns what was removed. Holds the study's lock, so no build is writing meanwhile."""
    study = load_study(project)
    removed: list[Path] = []
    with hold_study_lock(study.root):
        folder = study.root / CACHE_DIR
        if remove_cache(folder):
            removed.append(folder)
        elif folder.exists():
            raise OutputError(f"{folder} was not made by netfolio (it has no {CACHE_TAG}); "
                              "netfolio leaves it alone: remove it yourself")
        recover_interrupted_site(study.output)  # a site caught mid-swap is removed as a whole
        if study.output.exists():
            if not (study.output / MARKER).is_file():
                raise OutputError(f"the output folder {study.output} was not made by netfolio (no "
                                  f"{MARKER} file); netfolio leaves it alone")
            shutil.rmtree(study.output)
            removed.append(study.output)
    return removed


def _with_output(study: StudyConfig, output: Path) -> StudyConfig:
    resolved = output.resolve()
    if resolved == study.root or study.root.is_relative_to(resolved):
        raise ConfigError(f"--out {output} may not be the study folder or contain it")
    return replace(study, output=resolved)
