"""Default work scaled to a large network's size (generator/analyse/budget.py): fewer community
runs, perturbed reruns and rewired networks above SCALE_FROM_TIES ties, never for a setting the
study chose, stated by the build and on the methods page."""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from conftest import edge_study, study_toml

from generator.analyse import budget
from generator.analyse.budget import FLOORS, SCALE_FROM_TIES, scaled_for_size
from generator.build import Progress, build_study
from generator.config import CommunitiesConfig, SignificanceConfig, load_study


def test_small_networks_keep_every_setting():
    communities, significance = CommunitiesConfig(), SignificanceConfig()
    assert scaled_for_size(communities, significance, SCALE_FROM_TIES) == (
        communities, significance, ())


@pytest.mark.parametrize("ties, runs, perturbations, samples", [
    (200_000, 10, 25, 100), (1_000_000, 5, 5, 20), (10**8, 5, 5, 20)])
def test_defaults_shrink_in_proportion_to_the_ties_down_to_their_floors(ties, runs,
                                                                       perturbations, samples):
    communities, significance, scaled = scaled_for_size(CommunitiesConfig(),
                                                        SignificanceConfig(), ties)
    assert (communities.runs, communities.perturbations, significance.null_samples) == (
        runs, perturbations, samples)
    assert scaled == ("runs", "perturbations", "null_samples")
    assert min(runs, perturbations) >= FLOORS["runs"] and samples >= FLOORS["null_samples"]


def test_settings_the_study_chose_and_switched_off_counts_are_kept():
    communities = CommunitiesConfig(runs=20, perturbations=0, chosen=frozenset({"runs"}))
    significance = SignificanceConfig(null_samples=300, chosen=frozenset({"null_samples"}))
    kept, tests, scaled = scaled_for_size(communities, significance, 10**6)
    assert (kept.runs, kept.perturbations, tests.null_samples, scaled) == (20, 0, 300, ())


def test_the_study_file_records_which_keys_it_sets(tmp_path: Path):
    root = edge_study(tmp_path / "s", "source,target\na,b\n")
    toml = (root / "study.toml").read_text()
    (root / "study.toml").write_text(toml.replace("[communities]", "[communities]\nruns = 7", 1)
                                     if "[communities]" in toml else
                                     toml + "\n[communities]\nruns = 7\n")
    study = load_study(root)
    assert "runs" in study.communities.chosen
    assert "perturbations" not in study.communities.chosen or "perturbations" in toml


def test_a_scaled_network_says_so_in_the_build_and_on_the_methods_page(tmp_path: Path,
                                                                      monkeypatch):
    monkeypatch.setattr(budget, "SCALE_FROM_TIES", 10)
    edges = "source,target\n" + "".join(f"n{i},n{(i * 7 + 3) % 30}\n" for i in range(30))
    root = tmp_path / "s"
    root.mkdir()
    (root / "edges.csv").write_text(edges)
    (root / "study.toml").write_text(study_toml(networks=[{"id": "net", "edges": "edges.csv"}]))
    stream = io.StringIO()
    result = build_study(root, output=tmp_path / "site", progress=Progress(stream), fresh=True)
    analysis = result.networks[0]
    assert analysis.scaled and "runs" in analysis.scaled
    ties = len(analysis.edges)
    assert analysis.communities.runs == round(20 * 10 / ties)  # 20 x SCALE_FROM_TIES / ties
    line = next(line for line in stream.getvalue().splitlines() if "instead of the defaults" in line)
    assert line.startswith(f"analyse  net: with {ties} ties this network got "
                           f"{analysis.communities.runs} community runs")
    methods = (tmp_path / "site" / "methods.html").read_text()
    assert (f"With {ties} ties this network got {analysis.communities.runs} community runs"
            in methods)
    assert "[communities] runs" in methods


def test_sampled_path_sources_are_held_to_a_budget_of_sources_times_ties():
    from generator.analyse.budget import MIN_PATH_SOURCES, PATH_WORK, path_sources
    from generator.config import MeasuresConfig

    measures = MeasuresConfig(path_sample_sources=2000)
    assert path_sources(measures, PATH_WORK // 2000) == (measures, False)
    fewer, cut = path_sources(measures, 1_000_000)
    assert cut and fewer.path_sample_sources == PATH_WORK // 1_000_000 == 400
    assert path_sources(measures, 10**9)[0].path_sample_sources == MIN_PATH_SOURCES
    chosen = MeasuresConfig(path_sample_sources=2000, chosen=frozenset({"path_sample_sources"}))
    assert path_sources(chosen, 10**7) == (chosen, False)
