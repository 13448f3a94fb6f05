"""Results of earlier builds, kept in ``<study>/.netfolio-cache/`` so an unchanged network is
neither analysed nor drawn again.

Each entry is one JSON file: a header (format, version, kind, key) and the payload as text with
its SHA-256, so a later netfolio can reject an entry safely. Nothing is unpickled: an entry from an
untrusted folder can at worst be wrong JSON, which is discarded with a warning and recomputed.

A key is the SHA-256 of everything the result depends on: the bytes of every input file, the
settings that affect it, and the versions of netfolio, Python and the computing libraries. The
same key always means the same result, so a cached build writes the same bytes as a fresh one.
"""

from __future__ import annotations

import base64
import hashlib
import json
import math
import os
import platform
import shutil
import tempfile
from collections.abc import Callable, Iterable
from dataclasses import dataclass, fields
from pathlib import Path
from typing import Any, TypeVar

import pandas as pd

from . import __version__
from .analyse import (
    AttributeComparison,
    CommunityProfile,
    CommunityResult,
    GroupMixing,
    MixingTable,
    NetworkAnalysis,
    NullTest,
    Omission,
    PathSampling,
    SignificanceResult,
    StabilityResult,
    Statistic,
)
from .analyse.provenance import library_versions
from .config import NetworkConfig, StudyConfig
from .draw import Figure, FigureSettings
from .errors import Finding
from .render.site import PageReuse

__all__ = [
    "CACHE_DIR",
    "CACHE_TAG",
    "FORMAT_VERSION",
    "ResultCache",
    "analysis_key",
    "figures_key",
    "is_cache_folder",
    "remove_cache",
]

T = TypeVar("T")
CACHE_DIR = ".netfolio-cache"
FORMAT = "netfolio-cache"
FORMAT_VERSION = 7
# The Cache Directory Tagging Specification's tag: backup tools skip the folder, and clean knows
# netfolio made it.
CACHE_TAG = "CACHEDIR.TAG"
_TAG_TEXT = ("Signature: 8a477f597d28d172789f06886806bc55\n"
             "# This folder holds netfolio's cache of results; netfolio clean removes it.\n")
# Bumped whenever figures are drawn differently for the same analysis and settings.
FIGURE_STYLE = 6


# ---------------------------------------------------------------------------------------------
# Keys


def _digest(value: Any) -> str:
    text = json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=True)
    return hashlib.sha256(text.encode("ascii")).hexdigest()


def _file_digest(path: Path) -> str:
    digest = hashlib.sha256()
    with path.open("rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _settings(value: Any, root: Path) -> Any:
    """A config value as plain JSON, with paths relative to the study folder."""
    if isinstance(value, Path):
        return value.relative_to(root).as_posix() if value.is_relative_to(root) else str(value)
    if hasattr(value, "__dataclass_fields__"):
        return {f.name: _settings(getattr(value, f.name), root) for f in fields(value)}
    if isinstance(value, (tuple, list)):
        return [_settings(v, root) for v in value]
    if isinstance(value, frozenset):
        return sorted(_settings(v, root) for v in value)
    return value


_FIGURE_ONLY = ("color_by", "size_by")  # settings that change figures, never the analysis


def analysis_key(study: StudyConfig, net: NetworkConfig) -> str:
    """The key of one network's analysis: input bytes, settings and versions."""
    network = {k: v for k, v in _settings(net, study.root).items() if k not in _FIGURE_ONLY}
    files = [p for p in (net.data_file, net.nodes) if p is not None]
    return _digest({
        "format": FORMAT_VERSION,
        "versions": {**library_versions(), "python": platform.python_version(),
                     "netfolio": __version__},
        "network": network,
        "files": {study.relative(p): _file_digest(p) for p in files},
        "communities": _settings(study.communities, study.root),
        "measures": _settings(study.measures, study.root),
        "significance": _settings(study.significance, study.root),
        "seed": study.seed,
    })


def figures_key(analysis_key_: str, settings: FigureSettings) -> str:
    """The key of one network's figures: its analysis and how nodes are encoded."""
    return _digest({"analysis": analysis_key_, "settings": _settings(settings, Path("/")),
                    "style": FIGURE_STYLE})


# ---------------------------------------------------------------------------------------------
# Analysis as JSON and back


def _cell(value: Any) -> Any:
    if value is None or value is pd.NA:
        return None
    if hasattr(value, "item"):  # numpy scalar
        value = value.item()
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def _frame_to_json(frame: pd.DataFrame) -> dict[str, Any]:
    return {
        "index": {"name": frame.index.name, "dtype": str(frame.index.dtype),
                  "values": [_cell(v) for v in frame.index]},
        "columns": [{"name": name, "dtype": str(frame[name].dtype),
                     "values": [_cell(v) for v in frame[name].tolist()]}
                    for name in frame.columns],
    }


def _frame_from_json(data: dict[str, Any]) -> pd.DataFrame:
    index = data["index"]
    built = pd.Index(index["values"], name=index["name"], dtype=index["dtype"])
    columns = {c["name"]: pd.Series(_missing_as_nan(c["values"], c["dtype"]), index=built,
                                    dtype=c["dtype"]) for c in data["columns"]}
    frame: pd.DataFrame = pd.DataFrame(columns, index=built)
    return frame


def _missing_as_nan(values: list[Any], dtype: str) -> list[Any]:
    # Plain float columns hold NaN where nullable ones hold NA; JSON wrote both as null.
    return [math.nan if v is None else v for v in values] if dtype == "float64" else values


def _record(value: Any) -> dict[str, Any]:
    return {f.name: getattr(value, f.name) for f in fields(value)}


def analysis_to_json(analysis: NetworkAnalysis) -> dict[str, Any]:
    """Everything a NetworkAnalysis holds, as plain JSON values (floats round-trip exactly)."""
    return {
        "network_id": analysis.network_id, "title": analysis.title,
        "directed": analysis.directed, "weighted": analysis.weighted,
        "weight_means": analysis.weight_means,
        "measures": _frame_to_json(analysis.measures),
        "statistics": [_record(s) for s in analysis.statistics],
        "communities": _record(analysis.communities),
        "layout": [list(p) for p in analysis.layout],
        # Pairs, not objects: entries are written with sorted keys, and order matters here.
        "omitted": [[k, _record(v)] for k, v in analysis.omitted.items()],
        "sampling": None if analysis.sampling is None else _record(analysis.sampling),
        "seed": analysis.seed,
        "nodes": _frame_to_json(analysis.nodes),
        "edges": _frame_to_json(analysis.edges),
        "attributes": list(analysis.attributes),
        "findings": [_record(f) for f in analysis.findings],
        "versions": [[k, v] for k, v in analysis.versions.items()],
        "significance": _significance_to_json(analysis.significance),
        "mixing": [{**_record(t), "per_group": [_record(g) for g in t.per_group]}
                   for t in analysis.mixing],
        "listed_nodes": analysis.listed_nodes,
        "stability": _record(analysis.stability),
        "community_profiles": [_record(c) for c in analysis.community_profiles],
        "attribute_comparisons": [_record(c) for c in analysis.attribute_comparisons],
        "scaled": list(analysis.scaled),
    }


def _stability_from_json(data: dict[str, Any]) -> StabilityResult:
    together = data["together"]
    return StabilityResult(**{**data, "confidence": tuple(float(v) for v in data["confidence"]),
                              "together": None if together is None else
                              tuple(tuple(int(v) for v in row) for row in together)})


def _comparison_from_json(data: dict[str, Any]) -> AttributeComparison:
    return AttributeComparison(**{**data, "values": tuple(data["values"]),
                                  "counts": tuple(tuple(row) for row in data["counts"])})


def _significance_to_json(result: SignificanceResult) -> dict[str, Any]:
    return {**_record(result), "tests": [
        {**_record(t), "nulls": list(t.nulls)} for t in result.tests]}


def _significance_from_json(data: dict[str, Any]) -> SignificanceResult:
    tests = tuple(NullTest(**{**t, "nulls": tuple(float(v) for v in t["nulls"])})
                  for t in data["tests"])
    return SignificanceResult(**{**data, "tests": tests})


def analysis_from_json(data: dict[str, Any]) -> NetworkAnalysis:
    """The inverse of ``analysis_to_json``; KeyError or TypeError for anything malformed."""
    c = data["communities"]
    communities = CommunityResult(**{**c, "membership": tuple(c["membership"]),
                                     "sizes": tuple(c["sizes"])})
    return NetworkAnalysis(
        network_id=data["network_id"], title=data["title"], directed=data["directed"],
        weighted=data["weighted"], weight_means=data["weight_means"],
        measures=_frame_from_json(data["measures"]),
        statistics=tuple(Statistic(**s) for s in data["statistics"]),
        communities=communities,
        layout=tuple((float(x), float(y)) for x, y in data["layout"]),
        omitted={k: Omission(**v) for k, v in data["omitted"]},
        sampling=None if data["sampling"] is None else PathSampling(**data["sampling"]),
        seed=data["seed"],
        nodes=_frame_from_json(data["nodes"]),
        edges=_frame_from_json(data["edges"]),
        attributes=tuple(data["attributes"]),
        findings=tuple(Finding(**f) for f in data["findings"]),
        versions={str(k): str(v) for k, v in data["versions"]},
        significance=_significance_from_json(data["significance"]),
        mixing=tuple(MixingTable(**{
            **t, "groups": tuple(t["groups"]), "counts": tuple(tuple(r) for r in t["counts"]),
            "per_group": tuple(GroupMixing(**g) for g in t["per_group"])})
            for t in data["mixing"]),
        listed_nodes=data["listed_nodes"],
        stability=_stability_from_json(data["stability"]),
        community_profiles=tuple(CommunityProfile(**c) for c in data["community_profiles"]),
        attribute_comparisons=tuple(_comparison_from_json(c)
                                    for c in data["attribute_comparisons"]),
        scaled=tuple(str(name) for name in data["scaled"]),
    )


def _figures_to_json(figures: list[Figure]) -> list[dict[str, Any]]:
    return [{"name": f.name, "title": f.title, "alt": f.alt, "caption": f.caption,
             "svg": base64.b64encode(f.svg).decode("ascii"),
             "png": base64.b64encode(f.png).decode("ascii")} for f in figures]


def _figures_from_json(data: list[dict[str, Any]]) -> list[Figure]:
    return [Figure(name=f["name"], title=f["title"], alt=f["alt"], caption=f["caption"],
                   svg=base64.b64decode(f["svg"], validate=True),
                   png=base64.b64decode(f["png"], validate=True)) for f in data]


def _files_to_json(files: dict[str, bytes]) -> dict[str, str]:
    return {path: base64.b64encode(data).decode("ascii") for path, data in files.items()}


def _files_from_json(data: dict[str, str]) -> dict[str, bytes]:
    return {str(path): base64.b64decode(text, validate=True) for path, text in data.items()}


# ---------------------------------------------------------------------------------------------
# The store


def is_cache_folder(folder: Path) -> bool:
    """True for a folder netfolio made for its cache (it holds the cache tag)."""
    return folder.is_dir() and not folder.is_symlink() and (folder / CACHE_TAG).is_file()


@dataclass
class ResultCache:
    """The cache of one study. ``fresh`` ignores what is stored (and stores anew); ``warn``
    receives one line per entry that had to be discarded."""

    folder: Path
    warn: Callable[[str], None]
    fresh: bool = False

    def __post_init__(self) -> None:
        self._used: set[Path] = set()
        self._writable = True
        # Results of earlier builds by this same object (the preview builds again and again in
        # one process): taken from memory, not parsed from disk again.
        self._memory: dict[Path, Any] = {}
        self.page_reuse = PageReuse()  # rendered pages, in memory only

    def begin_build(self, *, fresh: bool = False) -> None:
        """Start another build with this cache: forget which entries the last one used."""
        self.fresh = fresh
        self._used = set()
        if fresh:
            self._memory.clear()
            self.page_reuse = PageReuse()

    # -- reading --------------------------------------------------------------------------------

    def analysis(self, key: str) -> NetworkAnalysis | None:
        return self._load("analysis", key, analysis_from_json)

    def figures(self, key: str) -> list[Figure] | None:
        return self._load("figures", key, _figures_from_json)

    def files(self, key: str) -> dict[str, bytes] | None:
        return self._load("files", key, _files_from_json)

    def _path(self, kind: str, key: str) -> Path:
        return self.folder / f"{kind}-{key}.json"

    def _load(self, kind: str, key: str, parse: Callable[[Any], T]) -> T | None:
        path = self._path(kind, key)
        self._used.add(path)
        if self.fresh:
            return None
        if path in self._memory:
            remembered: T = self._memory[path]
            return remembered
        if not path.is_file():
            return None
        try:
            entry = json.loads(path.read_text(encoding="utf-8"))
            if (entry.get("format"), entry.get("version"), entry.get("kind"), entry.get("key")) != (
                    FORMAT, FORMAT_VERSION, kind, key):
                raise ValueError("written by another version of netfolio or for another result")
            payload = entry["payload"]
            if hashlib.sha256(payload.encode("utf-8")).hexdigest() != entry["sha256"]:
                raise ValueError("its checksum does not match: the file is damaged")
            result = parse(json.loads(payload))
            self._memory[path] = result
            return result
        except (OSError, ValueError, KeyError, TypeError, AttributeError) as exc:
            self.warn(f"discarded the cached {kind} {path.name} ({exc}); computing it again")
            self._discard(path)
            return None

    # -- writing --------------------------------------------------------------------------------

    def store_analysis(self, key: str, analysis: NetworkAnalysis) -> None:
        self._memory[self._path("analysis", key)] = analysis
        self._store("analysis", key, analysis_to_json(analysis))

    def store_figures(self, key: str, figures: list[Figure]) -> None:
        self._memory[self._path("figures", key)] = figures
        self._store("figures", key, _figures_to_json(figures))

    def store_files(self, key: str, files: dict[str, bytes]) -> None:
        self._memory[self._path("files", key)] = files
        self._store("files", key, _files_to_json(files))

    # -- the last site written ---------------------------------------------------------------

    def _site_record(self, output: Path) -> Path:
        name = hashlib.sha256(str(output).encode("utf-8")).hexdigest()
        return self.folder / f"site-{name}.json"

    def site_is_current(self, output: Path, key: str) -> bool:
        """True when ``output`` holds, unchanged, the site this cache last wrote there for
        ``key`` (every file listed in its manifest present with its checksum)."""
        record = self._site_record(output)
        self._used.add(record)
        if self.fresh or not record.is_file():
            return False
        try:
            entry = json.loads(record.read_text(encoding="utf-8"))
            if (entry.get("format"), entry.get("version"), entry.get("key")) != (
                    FORMAT, FORMAT_VERSION, key):
                return False
            manifest = (output / "manifest.json").read_bytes()
            if hashlib.sha256(manifest).hexdigest() != entry["manifest"]:
                return False
            for item in json.loads(manifest)["files"]:
                data = (output / item["path"]).read_bytes()
                if len(data) != item["size"] or hashlib.sha256(data).hexdigest() != item["sha256"]:
                    return False
            return True
        except (OSError, ValueError, KeyError, TypeError):
            return False

    def record_site(self, output: Path, key: str) -> None:
        """Remember that ``output`` now holds the site for ``key``."""
        record = self._site_record(output)
        self._used.add(record)
        if not self._writable:
            return
        try:
            manifest = (output / "manifest.json").read_bytes()
            self._ensure_folder()
            entry = {"format": FORMAT, "version": FORMAT_VERSION, "key": key,
                     "output": str(output), "manifest": hashlib.sha256(manifest).hexdigest()}
            handle, temporary = tempfile.mkstemp(prefix=".entry-", dir=self.folder)
            with os.fdopen(handle, "w", encoding="utf-8") as out:
                json.dump(entry, out)
            os.replace(temporary, record)
        except OSError:
            pass  # the next build simply builds again

    def _store(self, kind: str, key: str, payload: Any) -> None:
        if not self._writable:
            return
        text = json.dumps(payload, sort_keys=True, separators=(",", ":"), allow_nan=True)
        entry = {"format": FORMAT, "version": FORMAT_VERSION, "kind": kind, "key": key,
                 "sha256": hashlib.sha256(text.encode("utf-8")).hexdigest(), "payload": text}
        try:
            self._ensure_folder()
            handle, temporary = tempfile.mkstemp(prefix=".entry-", dir=self.folder)
            with os.fdopen(handle, "w", encoding="utf-8") as out:
                json.dump(entry, out)
            os.replace(temporary, self._path(kind, key))  # whole entries only, never half
        except OSError as exc:
            self._writable = False
            self.warn(f"cannot write the cache in {self.folder} ({exc.strerror}); the next build "
                      "computes everything again")

    def _ensure_folder(self) -> None:
        if not self.folder.exists():
            self.folder.mkdir(parents=True)
        if not (self.folder / CACHE_TAG).is_file():
            (self.folder / CACHE_TAG).write_text(_TAG_TEXT, encoding="ascii")

    def _discard(self, path: Path) -> None:
        try:
            path.unlink()
        except OSError:
            pass

    def prune(self) -> None:
        """Remove the entries this build did not ask for, so the cache holds one study state."""
        if not is_cache_folder(self.folder):
            return
        for path in _entries(self.folder):
            if path not in self._used:
                self._discard(path)
                self._memory.pop(path, None)


def _entries(folder: Path) -> Iterable[Path]:
    for kind in ("analysis", "figures", "files", "site"):
        yield from sorted(folder.glob(f"{kind}-*.json"))
    yield from sorted(folder.glob(".entry-*"))  # writes a killed build left half done


def remove_cache(folder: Path) -> bool:
    """Remove the cache folder if netfolio made it; True if it was removed."""
    if not is_cache_folder(folder):
        return False
    shutil.rmtree(folder)
    return True
