"""Read study.toml into frozen, validated settings; the rest of netfolio never reads raw TOML."""

from __future__ import annotations

import difflib
import math
import re
import sys
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any, Literal

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised only on Python 3.10
    import tomli as tomllib

from .errors import ConfigError
from .vocabulary import COMMUNITY_METHODS as METHOD_ENTRIES
from .vocabulary import SIZE_MEASURES, measure

__all__ = [
    "BuildConfig",
    "CommunitiesConfig",
    "EdgeListSource",
    "MatrixSource",
    "MeasuresConfig",
    "NETWORK_KEYS",
    "NetworkConfig",
    "NetworkSource",
    "RelationModelConfig",
    "RelationsConfig",
    "SharingConfig",
    "SignificanceConfig",
    "SiteConfig",
    "StudyConfig",
    "check_relation_data",
    "load_study",
    "network_setting_error",
    "projections",
]

STUDY_FILE = "study.toml"
COMMUNITY_METHODS = tuple(m.key for m in METHOD_ENTRIES)
DUPLICATE_RULES = ("sum", "mean", "max")
WEIGHT_MEANINGS = ("strength", "distance")
DELIMITERS = (",", ";", "\t", "|")
DECIMALS = (".", ",")
_ID = re.compile(r"^[a-z0-9-]+$")

DEFAULT_SEED = 1
DEFAULT_OUTPUT = "output"
DEFAULT_RUNS = 20
DEFAULT_NULL_SAMPLES = 200
DEFAULT_PERTURBATIONS = 50
DEFAULT_PERTURB_SHARE = 0.1
DEFAULT_EXACT_PATHS_UP_TO = 5000
DEFAULT_PATH_SAMPLE_SOURCES = 2000
DEFAULT_PERMUTATIONS = 1000  # QAP and MRQAP node-label permutations of a [[relations]] table


@dataclass(frozen=True, kw_only=True)
class EdgeListSource:
    """An edge list: one row per tie, in the columns ``source`` and ``target`` (and ``weight``)."""

    path: Path
    source: str = "source"
    target: str = "target"
    weight: str | None = None
    kind: Literal["edges"] = "edges"


@dataclass(frozen=True, kw_only=True)
class MatrixSource:
    """An adjacency matrix: labels in the header row and first column, rows send ties, a cell is
    the tie's weight."""

    path: Path
    kind: Literal["matrix"] = "matrix"


NetworkSource = EdgeListSource | MatrixSource

# The keys a [[network]] table may hold (the study.toml contract).
NETWORK_KEYS = (
    "id", "title", "edges", "matrix", "nodes", "node_id", "label", "source", "target", "directed",
    "weight", "weight_means", "duplicates", "two_mode", "modes", "series", "wave", "color_by",
    "size_by", "delimiter", "decimal", "categorical", "numeric", "projection",
)
PROJECTIONS = ("shared", "newman")  # how a two-mode network's projections weigh their ties


@dataclass(frozen=True, kw_only=True)
class NetworkConfig:
    """One ``[[network]]`` table: where its data are and how to read them."""

    id: str
    title: str
    data: NetworkSource
    nodes: Path | None = None
    node_id: str = "id"
    label: str | None = None
    directed: bool = False
    weight_means: str = "strength"
    duplicates: str = "sum"
    two_mode: bool = False
    modes: tuple[str, str] = ("person", "event")
    series: str | None = None
    wave: int | None = None
    color_by: str | None = None
    size_by: str | None = None
    delimiter: str = ","  # between values in every CSV file of this network
    decimal: str = "."  # the decimal mark of numbers (weights, numeric attributes)
    # Node attributes declared as categories or as numbers; the others are typed by their values
    # (a column of plainly written numbers is numeric).
    categorical: tuple[str, ...] = ()
    numeric: tuple[str, ...] = ()
    projection: str = "shared"  # two-mode: "shared" (count of shared nodes) or "newman"
    # A projection of a two-mode network onto one of its modes: the two-mode network's id and
    # the mode. Its data are the two-mode network's files; it is analysed as any one-mode network.
    projected_from: str | None = None
    projected_mode: str | None = None

    @property
    def data_file(self) -> Path:
        return self.data.path

    @property
    def edges(self) -> Path | None:
        return self.data.path if isinstance(self.data, EdgeListSource) else None

    @property
    def matrix(self) -> Path | None:
        return self.data.path if isinstance(self.data, MatrixSource) else None

    @property
    def weight(self) -> str | None:
        """The edge-list weight column; None for an unweighted list and for a matrix."""
        return self.data.weight if isinstance(self.data, EdgeListSource) else None


@dataclass(frozen=True, kw_only=True)
class CommunitiesConfig:
    method: str = "leiden"
    resolution: float = 1.0
    runs: int = DEFAULT_RUNS
    perturbations: int = DEFAULT_PERTURBATIONS  # reruns on the network with ties removed; 0 = off
    perturb_share: float = DEFAULT_PERTURB_SHARE  # share of the ties each rerun removes
    chosen: frozenset[str] = frozenset()  # the keys study.toml sets (the rest are defaults)


@dataclass(frozen=True, kw_only=True)
class SignificanceConfig:
    null_samples: int = DEFAULT_NULL_SAMPLES
    chosen: frozenset[str] = frozenset()  # the keys study.toml sets


@dataclass(frozen=True, kw_only=True)
class MeasuresConfig:
    """Above ``exact_paths_up_to`` nodes, path measures use ``path_sample_sources`` sampled sources."""

    exact_paths_up_to: int = DEFAULT_EXACT_PATHS_UP_TO
    path_sample_sources: int = DEFAULT_PATH_SAMPLE_SOURCES
    chosen: frozenset[str] = frozenset()  # the keys study.toml sets


@dataclass(frozen=True, kw_only=True)
class SharingConfig:
    """Rules for partner bundles (``netfolio pack``). ``terms`` is a markdown file of sharing
    terms inside the study folder; it need exist only when a bundle is packed, so a build never
    stops for it. ``contact`` says whom partners ask. ``drop_given``: study.toml names ``drop``
    itself, so each column it names must exist (those of the default list need not)."""

    pseudonymize: bool = True
    drop: tuple[str, ...] = ("name", "email")
    min_group: int = 5
    terms: Path | None = None
    contact: str | None = None
    drop_given: bool = field(default=False, compare=False)


@dataclass(frozen=True, kw_only=True)
class SiteConfig:
    theme: str = "default"
    allow_html: bool = False
    node_views: bool | None = None  # a page per node; None: for networks up to 2,000 nodes


@dataclass(frozen=True, kw_only=True)
class BuildConfig:
    """How the build runs; never what it makes (the site is the same bytes either way).
    ``cluster``: the address of a Dask distributed scheduler that analyses and draws the
    networks; None runs them on this computer."""

    cluster: str | None = None


@dataclass(frozen=True, kw_only=True)
class RelationModelConfig:
    """``model = {...}`` of a ``[[relations]]`` table: the outcome relation regressed on the
    predictor relations, on "both nodes share the value" of each ``same`` attribute and on the
    absolute difference of each ``difference`` attribute."""

    outcome: str
    predictors: tuple[str, ...] = ()
    same: tuple[str, ...] = ()
    difference: tuple[str, ...] = ()


@dataclass(frozen=True, kw_only=True)
class RelationsConfig:
    """One ``[[relations]]`` table: networks on the same nodes compared on ``compare/<id>.html``."""

    id: str
    title: str
    networks: tuple[str, ...]
    permutations: int = DEFAULT_PERMUTATIONS
    model: RelationModelConfig | None = None
    index: int = field(default=1, compare=False)  # its place among the [[relations]] tables

    @property
    def dotted(self) -> str:
        return f"relations[{self.index}]"


@dataclass(frozen=True, kw_only=True)
class StudyConfig:
    """The whole of study.toml, with every path made absolute and checked to lie in ``root``."""

    root: Path
    title: str
    summary: Path | None = None
    seed: int = DEFAULT_SEED
    output: Path
    networks: tuple[NetworkConfig, ...] = ()  # one-mode networks, with two-mode projections
    two_mode: tuple[NetworkConfig, ...] = ()  # two-mode networks, each with its page and files
    communities: CommunitiesConfig = field(default_factory=CommunitiesConfig)
    significance: SignificanceConfig = field(default_factory=SignificanceConfig)
    measures: MeasuresConfig = field(default_factory=MeasuresConfig)
    sharing: SharingConfig = field(default_factory=SharingConfig)
    site: SiteConfig = field(default_factory=SiteConfig)
    build: BuildConfig = field(default_factory=BuildConfig)
    relations: tuple[RelationsConfig, ...] = ()  # networks on the same nodes, compared

    @property
    def study_file(self) -> Path:
        return self.root / STUDY_FILE

    def relative(self, path: Path) -> str:
        """A path as the user wrote it: relative to the study folder, with forward slashes."""
        try:
            return path.relative_to(self.root).as_posix()
        except ValueError:
            return str(path)


# ---------------------------------------------------------------------------------------------
# Parsing


class _Table:
    """A TOML table being read: records the keys taken so unknown ones can be reported."""

    def __init__(self, data: Any, dotted: str, allowed: tuple[str, ...]):
        if not isinstance(data, dict):
            raise ConfigError(f"must be a table, got {_describe(data)}", key=dotted)
        self.data = data
        self.dotted = dotted
        unknown = [k for k in data if k not in allowed]
        if unknown:
            key = unknown[0]
            close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.5)
            hint = f"; did you mean '{close[0]}'?" if close else f"; valid keys: {', '.join(allowed)}"
            raise ConfigError(f"unknown key '{key}'{hint}", key=self._key(key))

    def _key(self, name: str) -> str:
        return f"{self.dotted}.{name}" if self.dotted else name

    def get(self, name: str, kind: type | tuple[type, ...], default: Any = None, *,
            required: bool = False) -> Any:
        if name not in self.data:
            if required:
                raise ConfigError("is required", key=self._key(name))
            return default
        value = self.data[name]
        kinds = kind if isinstance(kind, tuple) else (kind,)
        # TOML booleans are ints in Python; never accept one for the other.
        ok = isinstance(value, kinds) and not (isinstance(value, bool) and bool not in kinds)
        if float in kinds and isinstance(value, int) and not isinstance(value, bool):
            ok, value = True, float(value)
        if not ok:
            want = " or ".join(_TYPE_NAMES.get(k, k.__name__) for k in kinds)
            raise ConfigError(f"must be {want}, got {_describe(value)}", key=self._key(name))
        return value

    def choice(self, name: str, allowed: tuple[str, ...], default: str) -> str:
        value: str = self.get(name, str, default)
        if value not in allowed:
            close = difflib.get_close_matches(value, allowed, n=1, cutoff=0.5)
            hint = f"; did you mean '{close[0]}'?" if close else ""
            raise ConfigError(f"must be one of {', '.join(allowed)}, got '{value}'{hint}",
                              key=self._key(name))
        return value

    def positive_int(self, name: str, default: int, *, minimum: int = 1) -> int:
        value: int = self.get(name, int, default)
        if value < minimum:
            raise ConfigError(f"must be at least {minimum}, got {value}", key=self._key(name))
        return value


_TYPE_NAMES = {str: "text", int: "a whole number", float: "a number", bool: "true or false",
               list: "a list", dict: "a table"}


def _describe(value: Any) -> str:
    return f"{_TYPE_NAMES.get(type(value), type(value).__name__)} {value!r}"


def _inside(root: Path, raw: str, key: str) -> Path:
    """Resolve a data path and refuse it unless it stays inside the study folder."""
    path = (root / raw).resolve()
    if not path.is_relative_to(root):
        raise ConfigError(f"'{raw}' lies outside the study folder {root}; data must stay inside it",
                          key=key)
    return path


def _existing_file(root: Path, raw: str, key: str) -> Path:
    if not raw.strip():
        raise ConfigError("is empty; give the path of a file in the study folder, or leave the "
                          "key out", key=key)
    path = _inside(root, raw, key)
    if path.is_dir():
        raise ConfigError(f"'{raw}' is a folder; give the path of a CSV file in it", key=key)
    if not path.is_file():
        raise ConfigError(f"file '{raw}' does not exist", key=key)
    return path


def _network(root: Path, data: Any, index: int) -> NetworkConfig:
    dotted = f"network[{index + 1}]"
    t = _Table(data, dotted, NETWORK_KEYS)
    net_id = t.get("id", str, required=True)
    if not _ID.fullmatch(net_id):
        raise ConfigError(f"'{net_id}' may hold only a-z, 0-9 and '-'", key=f"{dotted}.id")
    edges, matrix = t.get("edges", str), t.get("matrix", str)
    if (edges is None) == (matrix is None):
        raise ConfigError("give exactly one of 'edges' (an edge list) or 'matrix' (an adjacency "
                          "matrix)", key=dotted)
    nodes = t.get("nodes", str)
    label = t.get("label", str)
    if label is not None and nodes is None:
        raise ConfigError(f"'label' names a node-list column ('{label}'), but this network has no "
                          "'nodes' key; add the node list or remove 'label'", key=f"{dotted}.label")
    delimiter = t.get("delimiter", str, ",")
    if delimiter not in DELIMITERS:
        raise ConfigError(f"must be one of \",\", \";\", \"\\t\" (a tab) or \"|\", got {delimiter!r}",
                          key=f"{dotted}.delimiter")
    decimal = t.choice("decimal", DECIMALS, ".")
    if decimal == delimiter:
        raise ConfigError(f"decimal = '{decimal}' is also the separator between values; with a "
                          "decimal comma, set delimiter = \";\"", key=f"{dotted}.decimal")
    modes = t.get("modes", list, ["person", "event"])
    if len(modes) != 2 or not all(isinstance(m, str) and m for m in modes):
        raise ConfigError("must be a list of two names", key=f"{dotted}.modes")
    two_mode = t.get("two_mode", bool, False)
    projection = t.choice("projection", PROJECTIONS, "shared")
    if two_mode:
        _check_two_mode(t, modes, dotted)
    elif "projection" in data:
        raise ConfigError("'projection' applies only to two-mode networks (two_mode = true)",
                          key=f"{dotted}.projection")
    weight = t.get("weight", str)
    if matrix is not None and (weight is not None or "source" in data or "target" in data):
        raise ConfigError("'weight', 'source' and 'target' name edge-list columns; an adjacency "
                          "matrix has none (its cells are the weights)", key=dotted)
    source, target = t.get("source", str, "source"), t.get("target", str, "target")
    if source == target:
        raise ConfigError(f"'source' and 'target' both name the column '{source}'; every tie would "
                          "be a self-loop", key=f"{dotted}.target")
    if weight is not None and weight in (source, target):
        raise ConfigError(f"'weight' names the node column '{weight}'", key=f"{dotted}.weight")
    title = t.get("title", str, net_id)
    if not title.strip():
        raise ConfigError("may not be empty", key=f"{dotted}.title")
    _refuse_control_characters(title, f"{dotted}.title")
    wave = t.get("wave", int)
    series = t.get("series", str)
    if wave is not None and series is None:
        raise ConfigError("'wave' needs a 'series' to order the network within", key=f"{dotted}.wave")
    size_by = t.get("size_by", str)
    if size_by is not None and size_by not in SIZE_MEASURES:
        close = difflib.get_close_matches(size_by, SIZE_MEASURES, n=1, cutoff=0.5)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        raise ConfigError(f"'{size_by}' is not a node measure; use one of {', '.join(SIZE_MEASURES)}"
                          f"{hint}", key=f"{dotted}.size_by")
    directed = t.get("directed", bool, False)
    if size_by is not None and not directed and measure(size_by).directed_only:
        raise ConfigError(f"'{size_by}' applies only to directed networks; use "
                          f"'{size_by.split('_', 1)[1]}'", key=f"{dotted}.size_by")
    if size_by is not None and edges is not None and weight is None and measure(size_by).weighted_only:
        raise ConfigError(f"'{size_by}' needs a weight column; this network is unweighted, use "
                          f"'{size_by.replace('strength', 'degree')}'", key=f"{dotted}.size_by")
    categorical = _column_list(t, "categorical")
    numeric = _column_list(t, "numeric")
    both = [c for c in categorical if c in numeric]
    if both:
        raise ConfigError(f"'{both[0]}' is declared both categorical and numeric; an attribute "
                          "has one type: remove it from one of the two lists",
                          key=f"{dotted}.numeric")
    if (categorical or numeric) and nodes is None:
        raise ConfigError("'categorical' and 'numeric' declare node-list columns, but this "
                          "network has no 'nodes' key", key=f"{dotted}.categorical" if categorical
                          else f"{dotted}.numeric")
    source_of_ties: NetworkSource
    if edges is not None:
        source_of_ties = EdgeListSource(path=_existing_file(root, edges, f"{dotted}.edges"),
                                        source=source, target=target, weight=weight)
    else:
        source_of_ties = MatrixSource(path=_existing_file(root, matrix, f"{dotted}.matrix"))
    return NetworkConfig(
        id=net_id,
        title=title.strip(),
        data=source_of_ties,
        nodes=_existing_file(root, nodes, f"{dotted}.nodes") if nodes is not None else None,
        node_id=t.get("node_id", str, "id"),
        label=label,
        directed=directed,
        weight_means=t.choice("weight_means", WEIGHT_MEANINGS, "strength"),
        duplicates=t.choice("duplicates", DUPLICATE_RULES, "sum"),
        two_mode=two_mode,
        modes=(modes[0], modes[1]),
        series=series,
        wave=wave,
        color_by=t.get("color_by", str),
        size_by=size_by,
        delimiter=delimiter,
        decimal=decimal,
        categorical=categorical,
        numeric=numeric,
        projection=projection,
    )


def _column_list(t: _Table, name: str) -> tuple[str, ...]:
    """A list of node-list column names, each named once."""
    values = t.get(name, list, [])
    key = f"{t.dotted}.{name}"
    if not all(isinstance(v, str) and v.strip() for v in values):
        bad = next(v for v in values if not (isinstance(v, str) and v.strip()))
        raise ConfigError(f"must be a list of node-list column names, got {_describe(bad)}",
                          key=key)
    repeated = [v for i, v in enumerate(values) if v in values[:i]]
    if repeated:
        raise ConfigError(f"names '{repeated[0]}' twice", key=key)
    return tuple(values)


def _check_two_mode(t: _Table, modes: list[str], dotted: str) -> None:
    if t.get("directed", bool, False):
        raise ConfigError("a two-mode network's ties join a node of one mode to a node of the "
                          "other and have no direction; remove 'directed'",
                          key=f"{dotted}.directed")
    for mode in modes:
        if not _ID.fullmatch(mode):
            raise ConfigError(f"mode name '{mode}' may hold only a-z, 0-9 and '-' (it names the "
                              "projection's page)", key=f"{dotted}.modes")
    if modes[0] == modes[1]:
        raise ConfigError(f"the two modes need different names, got '{modes[0]}' twice",
                          key=f"{dotted}.modes")


def projections(net: NetworkConfig) -> tuple[NetworkConfig, NetworkConfig]:
    """The one-mode networks a two-mode network projects onto, one per mode, with the id
    ``<id>-<mode>``. Their ties are strengths; colour and size settings stay with the two-mode
    network, since its attributes may belong to either mode."""
    return tuple(  # type: ignore[return-value]
        replace(net, id=f"{net.id}-{mode}", title=f"{net.title}: {mode} projection",
                two_mode=False, directed=False, weight_means="strength", color_by=None,
                size_by=None, series=None, wave=None, projected_from=net.id, projected_mode=mode)
        for mode in net.modes)


_TOP = ("study", "network", "relations", "communities", "significance", "measures", "sharing",
        "site", "build")


def load_study(project: Path | str) -> StudyConfig:
    """Read and validate ``project/study.toml``; raise ConfigError naming the dotted key."""
    root = Path(project).resolve()
    path = root / STUDY_FILE
    if not path.is_file():
        raise ConfigError(f"no {STUDY_FILE} in {root}; a study folder needs one (see the README's "
                          "study.toml reference)")
    try:
        raw = tomllib.loads(path.read_text(encoding="utf-8-sig"))
    except UnicodeDecodeError as exc:
        raise ConfigError(f"is not UTF-8 text ({exc.reason} at byte {exc.start})", path=path) from None
    except tomllib.TOMLDecodeError as exc:
        at = re.search(r"\(at line (\d+), column \d+\)", str(exc))
        raise ConfigError(f"is not valid TOML: {exc}", path=path,
                          line=int(at.group(1)) if at else None) from None
    try:
        return _study(root, raw)
    except ConfigError as exc:
        exc.path = path
        if exc.line is None and exc.key:  # every key set in study.toml is named with its line
            exc.line = _key_line(path.read_text(encoding="utf-8-sig"), exc.key)
        raise


def network_setting_error(study: StudyConfig, network_id: str, key: str, message: str
                          ) -> ConfigError:
    """A ConfigError for ``key`` of the [[network]] table with ``network_id``, naming its line
    of study.toml (for problems found once the data are read, such as a ``color_by`` that names
    no column of the node list)."""
    text = study.study_file.read_text(encoding="utf-8-sig")
    tables = tomllib.loads(text).get("network", [])
    index = next((i for i, t in enumerate(tables) if isinstance(t, dict)
                  and t.get("id") == network_id), None)
    dotted = f"network[{index + 1}].{key}" if index is not None else f"network.{key}"
    return ConfigError(message, key=dotted, path=study.study_file,
                       line=_key_line(text, dotted) if index is not None else None)


def _key_line(text: str, dotted: str) -> int | None:
    """The line (from 1) of study.toml where ``table.key`` is set, as an editor counts it. A
    dotted name that is a table (``network[2]``), or a key the table lacks (a required one), gives
    the line of the table's header; None when neither can be found."""
    whole = re.fullmatch(r"([a-z_]+)\[(\d+)\]", dotted)  # the n-th [[name]] table itself
    if whole:
        table, key = dotted, None
    else:
        table, _, key = dotted.rpartition(".")
    inside = table == ""
    array = re.fullmatch(r"([a-z_]+)\[(\d+)\]", table)  # the n-th [[name]] table
    seen = 0
    header: int | None = None
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("#", 1)[0].strip()
        if line.startswith("[[") and array:
            seen += line.strip("[] ") == array[1]
            inside = line.strip("[] ") == array[1] and seen == int(array[2])
            header = number if inside else header
        elif line.startswith("["):
            inside = line.strip("[] ") == table
            header = number if inside else header
        elif inside and key is not None and "=" in line and (
                line.partition("=")[0].strip().strip('"\'') == key):
            return number
    return header


def _study(root: Path, raw: dict[str, Any]) -> StudyConfig:
    _Table(raw, "", _TOP)
    if "study" not in raw:
        raise ConfigError("the [study] table is required (with at least a title)", key="study")
    s = _Table(raw["study"], "study", ("title", "summary", "seed", "output"))
    summary = s.get("summary", str)
    output_raw = s.get("output", str, DEFAULT_OUTPUT)
    output = (root / output_raw).resolve()
    if output == root or root.is_relative_to(output):
        raise ConfigError(f"the output folder '{output_raw}' may not be the study folder or "
                          "contain it", key="study.output")
    if not output.is_relative_to(root):
        # A study folder may come from someone else: it names where its site goes only inside
        # itself. Writing elsewhere is the person's own choice, on the command line.
        raise ConfigError(f"the output folder '{output_raw}' lies outside the study folder; "
                          "give a folder inside it, or write the site elsewhere with "
                          "'netfolio build --out <folder>'", key="study.output")

    networks_raw = raw.get("network", [])
    if not isinstance(networks_raw, list):
        raise ConfigError(f"must be written as [[network]] tables, got {_describe(networks_raw)}",
                          key="network", locate=True)
    if not networks_raw:
        raise ConfigError("at least one [[network]] table is required", key="network")
    written = tuple(_network(root, data, i) for i, data in enumerate(networks_raw))
    seen: dict[str, int] = {}
    for i, net in enumerate(written):
        for net_id in (net.id, *(p.id for p in projections(net) if net.two_mode)):
            if net_id in seen:
                what = "id" if net_id == net.id else "projection id"
                raise ConfigError(f"{what} '{net_id}' is already used by network[{seen[net_id] + 1}]",
                                  key=f"network[{i + 1}].id")
            seen[net_id] = i
    networks = tuple(p for net in written for p in (projections(net) if net.two_mode else (net,)))
    two_mode = tuple(net for net in written if net.two_mode)
    for net in written:
        for data_path in (net.data_file, net.nodes):
            if data_path is not None and data_path.is_relative_to(output):
                raise ConfigError(f"'{data_path.relative_to(root)}' lies inside the output folder",
                                  key="study.output")
    _check_waves(written)

    c = _Table(raw.get("communities", {}), "communities",
               ("method", "resolution", "runs", "perturbations", "perturb_share"))
    resolution = c.get("resolution", float, 1.0)
    if not (math.isfinite(resolution) and resolution > 0):
        raise ConfigError(f"must be above 0, got {resolution}", key="communities.resolution")
    perturbations, perturb_share = _perturbation_settings(c)
    g = _Table(raw.get("significance", {}), "significance", ("null_samples",))
    m = _Table(raw.get("measures", {}), "measures", ("exact_paths_up_to", "path_sample_sources"))
    sh = _Table(raw.get("sharing", {}), "sharing",
                ("pseudonymize", "drop", "min_group", "terms", "contact"))
    drop = sh.get("drop", list, ["name", "email"])
    if not all(isinstance(d, str) for d in drop):
        raise ConfigError("must be a list of column names", key="sharing.drop")
    terms = _sharing_terms(root, sh.get("terms", str))
    contact = sh.get("contact", str)
    if contact is not None and not contact.strip():
        raise ConfigError("is empty; say whom partners ask about the bundle, or leave the key out",
                          key="sharing.contact")
    si = _Table(raw.get("site", {}), "site", ("theme", "allow_html", "node_views"))
    cluster = _Table(raw.get("build", {}), "build", ("cluster",)).get("cluster", str)
    if cluster is not None and not cluster.strip():
        raise ConfigError("is empty; give the Dask scheduler's address (tcp://host:8786) or "
                          "leave the key out", key="build.cluster", locate=True)
    summary_path = _existing_file(root, summary, "study.summary") if summary is not None else None
    if summary_path is not None and summary_path.is_relative_to(output):
        raise ConfigError(f"'{summary}' lies inside the output folder, which is replaced on every "
                          "build", key="study.output")
    if (root / "notes").resolve().is_relative_to(output):
        raise ConfigError(f"the output folder '{output_raw}' may not hold the notes folder",
                          key="study.output")

    title = s.get("title", str, required=True)
    if not title.strip():
        raise ConfigError("may not be empty", key="study.title")
    _refuse_control_characters(title, "study.title")
    relations = _relations(raw.get("relations", []), written)
    return StudyConfig(
        root=root,
        title=title.strip(),
        summary=summary_path,
        seed=s.get("seed", int, DEFAULT_SEED),
        output=output,
        networks=networks,
        two_mode=two_mode,
        communities=CommunitiesConfig(
            method=c.choice("method", COMMUNITY_METHODS, "leiden"),
            resolution=resolution,
            runs=c.positive_int("runs", DEFAULT_RUNS),
            perturbations=perturbations,
            perturb_share=perturb_share,
            chosen=frozenset(c.data),
        ),
        significance=SignificanceConfig(
            null_samples=g.positive_int("null_samples", DEFAULT_NULL_SAMPLES, minimum=0),
            chosen=frozenset(g.data)),
        measures=MeasuresConfig(
            exact_paths_up_to=m.positive_int("exact_paths_up_to", DEFAULT_EXACT_PATHS_UP_TO),
            path_sample_sources=m.positive_int("path_sample_sources", DEFAULT_PATH_SAMPLE_SOURCES),
            chosen=frozenset(m.data),
        ),
        sharing=SharingConfig(
            pseudonymize=sh.get("pseudonymize", bool, True),
            drop=tuple(drop),
            min_group=sh.positive_int("min_group", 5),
            terms=terms,
            contact=contact.strip() if contact is not None else None,
            drop_given="drop" in sh.data,
        ),
        site=SiteConfig(theme=si.get("theme", str, "default"),
                        allow_html=si.get("allow_html", bool, False),
                        node_views=si.get("node_views", bool, None)),
        build=BuildConfig(cluster=cluster.strip() if cluster is not None else None),
        relations=relations,
    )


def _refuse_control_characters(text: str, key: str) -> None:
    """Titles go into every page and figure; a control character (a tab, a bell, a line
    break) would make the figures' SVG ill-formed."""
    bad = next((ch for ch in text if ord(ch) < 32 or ord(ch) == 127), None)
    if bad is not None:
        raise ConfigError(f"holds the control character U+{ord(bad):04X}; write the title on "
                          "one line with plain characters", key=key, locate=True)


def _perturbation_settings(c: _Table) -> tuple[int, float]:
    """``[communities] perturbations`` (a whole number, 0 or more; 0 turns it off) and
    ``perturb_share`` (in [0, 1)); an error names the line of study.toml and the value."""
    perturbations = c.data.get("perturbations", DEFAULT_PERTURBATIONS)
    if isinstance(perturbations, bool) or not isinstance(perturbations, int) or perturbations < 0:
        raise ConfigError(f"must be a whole number, 0 or more (0 turns the perturbed reruns "
                          f"off), got {_describe(perturbations)}",
                          key="communities.perturbations", locate=True)
    share = c.data.get("perturb_share", DEFAULT_PERTURB_SHARE)
    if (isinstance(share, bool) or not isinstance(share, (int, float))
            or not (math.isfinite(share) and 0 <= share < 1)):
        raise ConfigError(f"must be a number from 0 up to (not including) 1, the share of ties "
                          f"each perturbed rerun removes; got {_describe(share)}",
                          key="communities.perturb_share", locate=True)
    return perturbations, float(share)


def _sharing_terms(root: Path, raw: str | None) -> Path | None:
    """The terms file's path, kept inside the study folder; whether it exists is checked when a
    bundle is packed."""
    if raw is None:
        return None
    if not raw.strip():
        raise ConfigError("is empty; give the path of a markdown file in the study folder, or "
                          "leave the key out", key="sharing.terms")
    return _inside(root, raw, "sharing.terms")


def _check_waves(networks: tuple[NetworkConfig, ...]) -> None:
    by_series: dict[str, set[int]] = {}
    for i, net in enumerate(networks):
        if net.series is None or net.wave is None:
            continue
        if net.wave in by_series.setdefault(net.series, set()):
            raise ConfigError(f"series '{net.series}' already has a wave {net.wave}",
                              key=f"network[{i + 1}].wave")
        by_series[net.series].add(net.wave)


# ---------------------------------------------------------------------------------------------
# Relations on the same nodes

_RELATIONS_KEYS = ("id", "title", "networks", "permutations", "model")
_MODEL_KEYS = ("outcome", "predictors", "same", "difference")


def _relations(raw: Any, written: tuple[NetworkConfig, ...]) -> tuple[RelationsConfig, ...]:
    """Every ``[[relations]]`` table; its id shares compare/ with the series, so neither may
    repeat the other. Errors name the line of study.toml and the value."""
    if not isinstance(raw, list):
        raise ConfigError(f"must be written as [[relations]] tables, got {_describe(raw)}",
                          key="relations", locate=True)
    networks = {net.id: net for net in written if not net.two_mode}
    projected = {p.id for net in written if net.two_mode for p in projections(net)}
    series = {net.series for net in written if net.series is not None}
    found: list[RelationsConfig] = []
    for index, data in enumerate(raw, start=1):
        dotted = f"relations[{index}]"
        t = _Table(data, dotted, _RELATIONS_KEYS)
        rel_id = t.get("id", str, required=True)
        if not _ID.fullmatch(rel_id):
            raise ConfigError(f"'{rel_id}' may hold only a-z, 0-9 and '-' (it names the page "
                              f"compare/{rel_id}.html)", key=f"{dotted}.id", locate=True)
        for other in found:
            if other.id == rel_id:
                raise ConfigError(f"id '{rel_id}' is already used by relations[{other.index}]",
                                  key=f"{dotted}.id", locate=True)
        if rel_id in series:
            raise ConfigError(f"id '{rel_id}' is also the name of a series of waves; both would "
                              f"be the page compare/{rel_id}.html: give the relations another "
                              "id", key=f"{dotted}.id", locate=True)
        names = _network_list(t, "networks", networks, projected, required=True)
        if len(names) < 2:
            raise ConfigError(f"compares networks on the same nodes, so it needs two or more; "
                              f"got {_describe(list(names))}", key=f"{dotted}.networks",
                              locate=True)
        permutations = t.data.get("permutations", DEFAULT_PERMUTATIONS)
        if (isinstance(permutations, bool) or not isinstance(permutations, int)
                or permutations < 1):
            raise ConfigError(f"must be a whole number, 1 or more (the node-label permutations "
                              f"behind each p-value), got {_describe(permutations)}",
                              key=f"{dotted}.permutations", locate=True)
        title = t.get("title", str, rel_id)
        if not title.strip():
            raise ConfigError("may not be empty", key=f"{dotted}.title", locate=True)
        _refuse_control_characters(title, f"{dotted}.title")
        model = _relation_model(t, names, dotted)
        found.append(RelationsConfig(id=rel_id, title=title.strip(), networks=names,
                                     permutations=permutations, model=model, index=index))
    return tuple(found)


def _network_list(t: _Table, name: str, networks: dict[str, NetworkConfig], projected: set[str],
                  *, required: bool = False, key: str | None = None) -> tuple[str, ...]:
    """A list of one-mode network ids, each known and named once."""
    key = key or f"{t.dotted}.{name}"
    values = t.data.get(name)
    if values is None and not required:
        return ()
    if not isinstance(values, list) or not all(isinstance(v, str) for v in values):
        raise ConfigError(f"must be a list of network ids, got {_describe(values)}", key=key,
                          locate=True)
    for value in values:
        if value in projected:
            continue
        if value not in networks:
            known = [*networks, *sorted(projected)]
            close = difflib.get_close_matches(value, known, n=1, cutoff=0.5)
            hint = f"; did you mean '{close[0]}'?" if close else f"; networks: {', '.join(known)}"
            raise ConfigError(f"names '{value}', which is not the id of a network{hint}",
                              key=key, locate=True)
    repeated = [v for i, v in enumerate(values) if v in values[:i]]
    if repeated:
        raise ConfigError(f"names '{repeated[0]}' twice", key=key, locate=True)
    return tuple(values)


def _relation_model(t: _Table, names: tuple[str, ...], dotted: str) -> RelationModelConfig | None:
    if "model" not in t.data:
        return None
    key = f"{dotted}.model"
    data = t.data["model"]
    if not isinstance(data, dict):
        raise ConfigError(f"must be a table such as {{ outcome = \"{names[0]}\", predictors = "
                          f"[\"{names[1]}\"] }}, got {_describe(data)}", key=key, locate=True)
    unknown = [k for k in data if k not in _MODEL_KEYS]
    if unknown:
        close = difflib.get_close_matches(unknown[0], _MODEL_KEYS, n=1, cutoff=0.5)
        hint = f"; did you mean '{close[0]}'?" if close else f"; valid keys: {', '.join(_MODEL_KEYS)}"
        raise ConfigError(f"unknown key '{unknown[0]}'{hint}", key=key, locate=True)
    outcome = data.get("outcome")
    if not isinstance(outcome, str):
        raise ConfigError(f"needs 'outcome', the id of one of the networks {', '.join(names)}"
                          + (f"; got {_describe(outcome)}" if outcome is not None else ""),
                          key=key, locate=True)

    def among(value: str, what: str) -> None:
        if value not in names:
            raise ConfigError(f"{what} '{value}' is not one of this table's networks "
                              f"({', '.join(names)})", key=key, locate=True)

    among(outcome, "outcome")
    lists: dict[str, tuple[str, ...]] = {}
    for name in ("predictors", "same", "difference"):
        values = data.get(name, [])
        if not isinstance(values, list) or not all(isinstance(v, str) and v.strip()
                                                   for v in values):
            what = "network ids" if name == "predictors" else "node attribute names"
            raise ConfigError(f"'{name}' must be a list of {what}, got {_describe(values)}",
                              key=key, locate=True)
        repeated = [v for i, v in enumerate(values) if v in values[:i]]
        if repeated:
            raise ConfigError(f"'{name}' names '{repeated[0]}' twice", key=key, locate=True)
        lists[name] = tuple(values)
    for predictor in lists["predictors"]:
        among(predictor, "predictor")
        if predictor == outcome:
            raise ConfigError(f"'{outcome}' is both the outcome and a predictor", key=key,
                              locate=True)
    if not any(lists.values()):
        raise ConfigError("has no terms: give 'predictors', 'same' or 'difference'", key=key,
                          locate=True)
    return RelationModelConfig(outcome=outcome, **lists)


def check_relation_data(study: StudyConfig, node_ids: dict[str, frozenset[str]],
                        attributes: dict[str, dict[str, str]]) -> None:
    """What study.toml cannot show alone: the networks of each ``[[relations]]`` table have the
    same nodes, and the model's attributes exist. ``node_ids`` maps a network id to its node
    ids; ``attributes`` to its node attributes, each "number", "gaps" (a number with missing
    values) or "text". Raises a ConfigError naming the line of study.toml."""
    for relation in study.relations:
        dotted = relation.dotted
        first = relation.networks[0]
        for other in relation.networks[1:]:
            if node_ids[other] != node_ids[first]:
                only = sorted(node_ids[first] ^ node_ids[other])
                raise _located(study, f"networks '{first}' and '{other}' are not on the same "
                               f"nodes ({len(only)} nodes are in one only, such as "
                               f"'{only[0]}'); relations are compared on one node set",
                               f"{dotted}.networks")
        model = relation.model
        if model is None:
            continue
        known = attributes[model.outcome]
        for name in (*model.same, *model.difference):
            if name not in known:
                close = difflib.get_close_matches(name, list(known), n=1, cutoff=0.5)
                hint = (f"; did you mean '{close[0]}'?" if close else
                        f"; its attributes: {', '.join(known) or 'none'}")
                raise _located(study, f"'{name}' is not a node attribute of '{model.outcome}'"
                               f"{hint}", f"{dotted}.model")
        for name in model.difference:
            if known[name] == "text":
                raise _located(study, f"'difference' needs a numeric attribute, and '{name}' "
                               "holds text; put it under 'same'", f"{dotted}.model")
            if known[name] == "gaps":
                raise _located(study, f"'{name}' is missing for some nodes, so their difference "
                               "is unknown; fill it in or leave it out of 'difference'",
                               f"{dotted}.model")


def _located(study: StudyConfig, message: str, key: str) -> ConfigError:
    text = study.study_file.read_text(encoding="utf-8-sig") if study.study_file.is_file() else ""
    return ConfigError(message, key=key, path=study.study_file, line=_key_line(text, key))
