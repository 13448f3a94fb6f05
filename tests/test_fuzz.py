"""Property-based tests of the readers (hypothesis): whatever bytes or tables arrive as a node
list, an edge list, a matrix or study.toml, netfolio either reads them or raises one of its own
errors (a NetfolioError the CLI prints without a traceback), never anything else.

Each example reads a study written to a fresh folder; the number of examples is kept small per
test so the whole file runs in well under a minute, and the examples are derived from a fixed
database-free seed profile so CI sees the same ones."""

from __future__ import annotations

import csv
import io
import tempfile
from pathlib import Path

from conftest import study_toml, toml_value
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from generator.config import load_study
from generator.errors import NetfolioError
from generator.ingest import read_network

FUZZ = settings(max_examples=60, deadline=None, derandomize=True,
                suppress_health_check=[HealthCheck.too_slow])

# Cells that stress CSV parsing and cleaning: delimiters, quotes, line breaks, spaces, numbers in
# odd forms, markup, non-ASCII and control characters.
CELL = st.one_of(
    st.text(max_size=12),
    st.sampled_from(["", " ", "a", "A", "a ", "007", "7", "1e400", "-1", "0", "nan", "NaN", "inf",
                     "-inf", "1,5", "3.", ".5", "TRUE", '"', '""', "a,b", "x\ny", "\r", "\t",
                     "<b>", "é", "e\u0301", "\x00", "\ufeff", "１２"]),
)
ROWS = st.lists(st.lists(CELL, min_size=0, max_size=5), min_size=0, max_size=12)


def _csv(rows: list[list[str]]) -> bytes:
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerows(rows)
    return out.getvalue().encode("utf-8", errors="surrogatepass")


def _read(files: dict[str, bytes], network: dict[str, object]) -> None:
    """Write a one-network study and read it; only netfolio's own errors may come out."""
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        for name, data in files.items():
            (root / name).parent.mkdir(parents=True, exist_ok=True)
            (root / name).write_bytes(data)
        (root / "study.toml").write_text(study_toml(networks=[{"id": "net", **network}]))
        try:
            study = load_study(root)
            read_network(study, study.networks[0])
        except NetfolioError as error:
            assert error.format_message().strip()


@FUZZ
@given(data=st.binary(max_size=400))
def test_random_bytes_as_an_edge_list(data):
    _read({"edges.csv": data}, {"edges": "edges.csv"})


@FUZZ
@given(rows=ROWS, weighted=st.booleans(), directed=st.booleans())
def test_random_tables_as_an_edge_list(rows, weighted, directed):
    network: dict[str, object] = {"edges": "edges.csv", "directed": directed}
    if weighted:
        network["weight"] = "w"
    header = [["source", "target", "w"]] if rows and len(rows) % 2 else []
    _read({"edges.csv": _csv(header + rows)}, network)


@FUZZ
@given(edges=ROWS, nodes=ROWS)
def test_random_tables_as_a_node_list_beside_a_good_edge_list(edges, nodes):
    good = _csv([["source", "target"], ["a", "b"], ["b", "c"]] + edges[:2])
    _read({"edges.csv": good, "nodes.csv": _csv([["id", "group"]] + nodes)},
          {"edges": "edges.csv", "nodes": "nodes.csv"})


@FUZZ
@given(rows=ROWS, data=st.binary(max_size=200))
def test_random_tables_and_bytes_as_an_adjacency_matrix(rows, data):
    _read({"matrix.csv": _csv(rows)}, {"matrix": "matrix.csv"})
    _read({"matrix.csv": data}, {"matrix": "matrix.csv"})


@FUZZ
@given(text=st.text(max_size=300))
def test_random_text_as_study_toml(text):
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        (root / "study.toml").write_text(text, encoding="utf-8", errors="surrogatepass")
        try:
            load_study(root)
        except NetfolioError as error:
            assert error.format_message().strip()


VALUES = st.recursive(
    st.one_of(st.booleans(), st.integers(-3, 10**6), st.floats(allow_nan=False),
              st.sampled_from(["", "leiden", "louvain", "edges.csv", "../x.csv", "/etc/passwd",
                               "data/e.csv", "a", "true"]), st.text(max_size=8)),
    lambda inner: st.lists(inner, max_size=3), max_leaves=6)
KEYS = st.sampled_from(["id", "edges", "nodes", "matrix", "weight", "directed", "two_mode",
                        "series", "wave", "color_by", "size_by", "title", "label", "delimiter",
                        "decimal", "categorical", "numeric", "weight_means", "duplicates",
                        "modes", "projection", "unknown_key"])
TABLE_KEYS = {"study": ["title", "seed", "output", "summary"],
              "communities": ["method", "resolution", "runs", "perturbations", "perturb_share"],
              "significance": ["null_samples"],
              "measures": ["exact_paths_up_to", "path_sample_sources"],
              "sharing": ["pseudonymize", "drop", "min_group", "terms", "contact"],
              "site": ["theme", "allow_html", "node_views"], "build": ["cluster"]}


@st.composite
def study_files(draw) -> str:
    """study.toml texts shaped like real ones: known tables and keys with values of any kind."""
    parts = []
    for table, keys in TABLE_KEYS.items():
        if draw(st.booleans()):
            parts.append(f"[{table}]")
            for key in draw(st.lists(st.sampled_from(keys), max_size=3, unique=True)):
                parts.append(f"{key} = {toml_value(draw(VALUES))}")
    for _ in range(draw(st.integers(0, 2))):
        parts.append("[[network]]")
        for key in draw(st.lists(KEYS, max_size=6, unique=True)):
            parts.append(f"{key} = {toml_value(draw(VALUES))}")
    return "\n".join(parts) + "\n"


@FUZZ
@given(text=study_files())
def test_study_files_with_any_values_in_known_places(text):
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder)
        (root / "edges.csv").write_text("source,target\na,b\n")
        (root / "data").mkdir()
        (root / "data" / "e.csv").write_text("source,target,w\na,b,1\n")
        (root / "study.toml").write_text(text)
        try:
            study = load_study(root)
            for net in study.networks:
                if net.projected_from is None:  # projections are read with their two-mode data
                    read_network(study, net)
        except NetfolioError as error:
            assert error.format_message().strip()
