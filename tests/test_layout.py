"""The seeded layout shared by every figure (generator/analyse/layout.py)."""

from __future__ import annotations

from conftest import analyse, edge_study, load_network


def test_layout_is_in_the_unit_square_and_the_same_for_the_same_seed(tmp_path) -> None:
    root = edge_study(tmp_path / "s", "source,target\na,b\nb,c\nc,a\nc,d\nd,e\n")
    first = analyse(load_network(root), seed=5).layout
    assert analyse(load_network(root), seed=5).layout == first
    assert analyse(load_network(root), seed=6).layout != first
    assert all(0.0 <= x <= 1.0 and 0.0 <= y <= 1.0 for x, y in first)


def test_isolates_sit_in_a_row_below_the_connected_part(tmp_path) -> None:
    root = edge_study(tmp_path / "s", "source,target\na,b\nb,c\nc,a\n",
                      nodes="id\na\nb\nc\nx\ny\n")
    layout = dict(zip(["a", "b", "c", "x", "y"], analyse(load_network(root)).layout))
    lowest_tied = min(layout[v][1] for v in "abc")
    assert layout["x"][1] < lowest_tied and layout["y"][1] < lowest_tied
    assert layout["x"][1] == layout["y"][1] and layout["x"][0] != layout["y"][0]
