"""Parquet edge lists and node lists: read as the same text a CSV file holds, findings name the
row, and a study read from Parquet builds the same site as from CSV."""

from __future__ import annotations

import datetime
import random
from pathlib import Path

import pytest
from conftest import load_network, write_study

from generator.build import build_study
from generator.errors import DataError
from generator.ingest import parquet as parquet_module

pa = pytest.importorskip("pyarrow")
pq = pytest.importorskip("pyarrow.parquet")

EDGES = "data/edges.parquet"


def parquet_study(root: Path, edges: dict, nodes: dict | None = None, **network) -> Path:
    (root / "data").mkdir(parents=True, exist_ok=True)
    pq.write_table(pa.table(edges), root / EDGES)
    net = {"id": "net", "edges": EDGES, **network}
    if nodes is not None:
        pq.write_table(pa.table(nodes), root / "data" / "nodes.parquet")
        net["nodes"] = "data/nodes.parquet"
    return write_study(root, networks=[net])


def data_error(root: Path) -> DataError:
    with pytest.raises(DataError) as caught:
        load_network(root)
    return caught.value


def test_typed_columns_are_read_as_the_text_a_person_would_write(tmp_path):
    nodes = {
        "id": pa.array(["a", "b", "c", "d"]),
        "years": pa.array([3, 4, None, 12], pa.int32()),
        "share": pa.array([0.5, 1e-05, 2.0, float("nan")]),
        "member": pa.array([True, False, None, True]),
        "joined": pa.array([datetime.date(2020, 1, 2)] * 4),
        "clinic": pa.array(["north", "south", "north", None]).dictionary_encode(),
    }
    root = parquet_study(tmp_path, {"source": ["a", "b", "c"], "target": ["b", "c", "d"],
                                    "w": pa.array([1.0, 2.5, 3.0])}, nodes, weight="w")
    clean = load_network(root)
    assert clean.nodes["years"].dtype == "Int64"
    assert clean.nodes["years"].tolist()[:2] == [3, 4] and clean.nodes["years"].isna().tolist() == [
        False, False, True, False]
    # 2.0 reads as "2" and 1e-05 as "0.00001", so the column is numbers; NaN is missing
    assert clean.nodes["share"].dtype == "Float64"
    assert clean.nodes["share"].tolist()[:3] == [0.5, 0.00001, 2.0]
    assert clean.nodes["member"].tolist()[:2] == ["true", "false"]
    assert clean.nodes["joined"].tolist()[0] == "2020-01-02"
    assert clean.nodes["clinic"].tolist()[:3] == ["north", "south", "north"]
    assert [tuple(r) for r in clean.edges.itertuples(index=False)] == [
        ("a", "b", 1.0), ("b", "c", 2.5), ("c", "d", 3.0)]


ROWS = 200_000


@pytest.mark.parametrize("column, bad, message, value", [
    ("w", "heavy", "weight is not a number", "heavy"),
    ("w", "-3", "weight is negative; netfolio reads weights as tie strengths or distances, which "
                "cannot be below 0", "-3"),
    ("source", "", "a tie has an empty node id", ""),
])
def test_a_bad_row_near_the_end_of_a_large_parquet_edge_list_is_named_by_row(tmp_path, column,
                                                                             bad, message,
                                                                             value):
    rng = random.Random(4)
    edges = {"source": [f"n{rng.randrange(9000)}" for _ in range(ROWS)],
             "target": [f"n{rng.randrange(9000)}" for _ in range(ROWS)],
             "w": [str(rng.randint(1, 9)) for _ in range(ROWS)]}
    at = ROWS - 5
    edges[column][at] = bad
    (finding,) = data_error(parquet_study(tmp_path, edges, weight="w")).findings
    assert (finding.file, finding.line, finding.unit, finding.column, finding.value,
            finding.message) == (EDGES, at + 1, "row", column, value, message)
    assert finding.format().startswith(f"{EDGES}, row {at + 1}, column '{column}': ")


def test_a_negative_weight_in_a_column_of_numbers_is_named_by_row(tmp_path):
    root = parquet_study(tmp_path, {"source": ["a", "b"], "target": ["b", "c"],
                                    "w": pa.array([2.0, -0.5])}, weight="w")
    (finding,) = data_error(root).findings
    assert finding.format() == (f"{EDGES}, row 2, column 'w': weight is negative; netfolio reads "
                                "weights as tie strengths or distances, which cannot be below 0 "
                                "(value: '-0.5')")


def test_a_repeated_node_id_names_both_rows(tmp_path):
    root = parquet_study(tmp_path, {"source": ["a"], "target": ["b"]},
                         {"id": ["a", "b", "a"], "unit": ["x", "y", "z"]})
    (finding,) = data_error(root).findings
    assert (finding.file, finding.line, finding.message) == (
        "data/nodes.parquet", 3, "node id is repeated (first on row 1)")


def test_a_column_of_lists_is_refused_naming_the_column(tmp_path):
    root = parquet_study(tmp_path, {"source": ["a"], "target": ["b"],
                                    "tags": pa.array([["x", "y"]])})
    (finding,) = data_error(root).findings
    assert (finding.file, finding.column) == (EDGES, "tags")
    assert finding.message.startswith("column 'tags' holds values of the Parquet type list")


def test_a_file_that_is_not_parquet_is_refused(tmp_path):
    root = parquet_study(tmp_path, {"source": ["a"], "target": ["b"]})
    (root / EDGES).write_text("source,target\na,b\n")
    (finding,) = data_error(root).findings
    assert finding.file == EDGES and finding.message.startswith("cannot be read as Parquet")


def test_without_pyarrow_the_error_says_how_to_install_the_extra(tmp_path, monkeypatch):
    monkeypatch.setattr(parquet_module, "_pyarrow", lambda: (None, None, None))
    root = parquet_study(tmp_path, {"source": ["a"], "target": ["b"]})
    (finding,) = data_error(root).findings
    assert finding.file == EDGES
    assert "pip install 'netfolio[parquet]'" in finding.message


def test_an_adjacency_matrix_in_parquet_is_refused(tmp_path):
    (tmp_path / "data").mkdir()
    pq.write_table(pa.table({"": ["a", "b"], "a": [0, 1], "b": [1, 0]}),
                   tmp_path / "data" / "m.parquet")
    root = write_study(tmp_path, networks=[{"id": "net", "matrix": "data/m.parquet"}])
    (finding,) = data_error(root).findings
    assert finding.message.startswith("an adjacency matrix is read from CSV only")


# ---------------------------------------------------------------------------------------------
# The same study from CSV and from Parquet


def _study(root: Path, kind: str) -> Path:
    rng = random.Random(8)
    ids = [f"p{i}" for i in range(1, 41)]
    ties = sorted({(rng.choice(ids), rng.choice(ids)) for _ in range(120)})
    ties = [(s, t) for s, t in ties if s != t]
    weights = [rng.randint(1, 5) for _ in ties]
    groups = [rng.choice(["north", "south", "east"]) for _ in ids]
    years = [rng.randint(1, 30) for _ in ids]
    scores = [rng.choice([0.5, 1.25, 2.0, 3.75]) for _ in ids]
    (root / "data").mkdir(parents=True)
    if kind == "csv":
        (root / "data" / "edges.csv").write_text(
            "source,target,weight\n" + "".join(f"{s},{t},{w}\n" for (s, t), w in zip(ties, weights)))
        (root / "data" / "nodes.csv").write_text("id,group,years,score,label\n" + "".join(
            f"{i},{g},{y},{x},Person {i[1:]}\n" for i, g, y, x in zip(ids, groups, years, scores)))
    else:
        pq.write_table(pa.table({"source": [s for s, _ in ties], "target": [t for _, t in ties],
                                 "weight": pa.array(weights, pa.int64())}),
                       root / "data" / "edges.parquet")
        pq.write_table(pa.table({"id": ids, "group": groups, "years": pa.array(years, pa.int16()),
                                 "score": pa.array(scores, pa.float64()),
                                 "label": [f"Person {i[1:]}" for i in ids]}),
                       root / "data" / "nodes.parquet")
    return write_study(root, study={"title": "Invented", "seed": 3}, networks=[{
        "id": "net", "edges": f"data/edges.{kind}", "nodes": f"data/nodes.{kind}",
        "weight": "weight", "directed": True, "color_by": "group", "numeric": ["years"],
        "categorical": ["group"]}])


def test_a_study_read_from_parquet_builds_the_site_it_builds_from_csv(tmp_path):
    # Every file is byte-identical once the source files' names are swapped back (the methods
    # and downloads pages name the files read), except manifest.json, whose hashes cover those
    # two pages.
    sites = {}
    for kind in ("csv", "parquet"):
        out = build_study(_study(tmp_path / kind, kind)).output
        sites[kind] = {p.relative_to(out).as_posix(): p.read_bytes()
                       for p in sorted(out.rglob("*")) if p.is_file()}
    assert sites["csv"].keys() == sites["parquet"].keys()
    named = []
    for path, data in sites["parquet"].items():
        if path == "manifest.json":
            continue
        swapped = data.replace(b"edges.parquet", b"edges.csv").replace(b"nodes.parquet",
                                                                       b"nodes.csv")
        assert swapped == sites["csv"][path], path
        named += [path] if swapped != data else []
    assert sorted(named) == ["downloads.html", "methods.html"]  # they name the files read


def test_a_two_mode_parquet_edge_list_names_rows(tmp_path):
    from generator.config import load_study
    from generator.ingest.two_mode import read_two_mode

    root = parquet_study(tmp_path, {"person": ["p1", "p2", "p1", "p3"],
                                    "event": ["e1", "e1", "e1", "e2"]},
                         {"id": ["p1", "p2", "p2", "e1"], "mode": ["person"] * 3 + ["event"]},
                         source="person", target="event", two_mode=True,
                         modes=["person", "event"])
    study = load_study(root)
    with pytest.raises(DataError) as caught:
        read_two_mode(study, study.two_mode[0])
    (finding,) = caught.value.findings
    assert finding.format() == ("data/nodes.parquet, row 3, column 'id': node id is repeated as "
                                "a person (first on row 2) (value: 'p2')")
    pq.write_table(pa.table({"id": ["p1", "p2", "e1"], "mode": ["person", "person", "event"]}),
                   root / "data" / "nodes.parquet")
    network = read_two_mode(study, study.two_mode[0])
    merged = next(f for f in network.checks.findings if "repeated tie" in f.message)
    assert (merged.line, merged.unit) == (1, "row")
    assert merged.message == "1 repeated tie merged, kept once; rows 1, 3"
    assert sorted(network.ids("person")) == ["p1", "p2", "p3"]
