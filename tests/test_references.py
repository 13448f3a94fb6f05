"""The references an analysis cites (generator.render.describe.references_of, drawing on the
reference data in generator/vocabulary/references.py): exactly those of the methods that ran."""

from __future__ import annotations

from conftest import analyse, edge_study, load_network

from generator.render.describe import references_of


def cited(analysis) -> list[str]:
    return [r.key for r in references_of(analysis)]


def test_community_references_are_cited_only_when_communities_were_searched(tmp_path) -> None:
    tied = analyse(load_network(edge_study(tmp_path / "a", "source,target\na,b\nb,c\n")))
    keys = cited(tied)
    assert {"traag2019", "hubert1985", "danon2005", "okabe2008"} <= set(keys)
    empty = analyse(load_network(edge_study(tmp_path / "b", "source,target\na,a\n",
                                            nodes="id\na\nb\n")))
    keys = cited(empty)
    assert "traag2019" not in keys and "hubert1985" not in keys
    assert len(keys) == len(set(keys))


def test_weight_and_sampling_references_are_cited_only_when_they_apply(tmp_path) -> None:
    edges = "source,target,weight\na,b,2\nb,c,1\nc,d,3\n"
    weighted = analyse(load_network(edge_study(tmp_path / "w", edges, weight="weight")),
                       exact_up_to=2, sample_sources=3)
    assert weighted.sampling is not None
    assert {"opsahl2010", "newman2001", "brandes2007"} <= set(cited(weighted))
    plain = analyse(load_network(edge_study(tmp_path / "p", "source,target\na,b\nb,c\n")))
    assert plain.sampling is None
    assert not {"opsahl2010", "newman2001", "brandes2007"} & set(cited(plain))
