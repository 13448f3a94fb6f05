"""Reading study.toml (generator/config.py): defaults, types, names, and paths that must stay
inside the study folder."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from conftest import study_toml, write_study

from generator.config import (
    BuildConfig,
    CommunitiesConfig,
    EdgeListSource,
    MatrixSource,
    MeasuresConfig,
    SharingConfig,
    SiteConfig,
    load_study,
)
from generator.errors import ConfigError

EDGES = "source,target\na,b\n"


def net(**keys):
    return {"id": "advice", "edges": "data/edges.csv", **keys}


def study_with(tmp_path: Path, *, networks=None, study=None, tables=None, files=None) -> Path:
    return write_study(tmp_path, networks=[net()] if networks is None else networks,
                       study=study, tables=tables,
                       files={"data/edges.csv": EDGES, **(files or {})})


def config_error(root: Path) -> ConfigError:
    with pytest.raises(ConfigError) as caught:
        load_study(root)
    return caught.value


# ---------------------------------------------------------------------------------------------
# A valid study


def test_minimal_study_loads_with_documented_defaults(tmp_path):
    study = load_study(write_study(tmp_path, networks=[net()], files={"data/edges.csv": EDGES},
                                   null_samples=None, perturbations=None))
    root = tmp_path.resolve()
    assert study.root == root
    assert study.title == "Invented study"
    assert study.seed == 1
    assert study.output == root / "output"
    assert study.summary is None
    assert study.communities == CommunitiesConfig(method="leiden", resolution=1.0, runs=20)
    assert study.significance.null_samples == 200
    assert study.measures == MeasuresConfig()
    assert study.sharing == SharingConfig(pseudonymize=True, drop=("name", "email"), min_group=5)
    assert study.site == SiteConfig(theme="default", allow_html=False)
    (network,) = study.networks
    assert network.id == "advice" and network.title == "advice"
    assert network.edges == root / "data" / "edges.csv" and network.matrix is None
    assert network.data == EdgeListSource(path=root / "data" / "edges.csv", source="source",
                                          target="target", weight=None)
    assert network.node_id == "id"
    assert network.directed is False and network.weight is None
    assert (network.weight_means, network.duplicates) == ("strength", "sum")


def test_every_documented_key_is_read(tmp_path):
    files = {"data/staff.csv": "id,name\na,x\nb,y\n", "notes/index.md": "# Notes\n"}
    networks = [net(title="Advice, wave 1", nodes="data/staff.csv", node_id="id", label="name",
                    source="source", target="target", directed=True, weight="times",
                    weight_means="distance", duplicates="max", series="advice", wave=1,
                    color_by="community", size_by="pagerank")]
    tables = {"communities": {"method": "louvain", "resolution": 2, "runs": 5,
                              "perturbations": 7, "perturb_share": 0.25},
              "significance": {"null_samples": 0},
              "measures": {"exact_paths_up_to": 100, "path_sample_sources": 10},
              "sharing": {"pseudonymize": False, "drop": ["name"], "min_group": 3},
              "site": {"theme": "plain", "allow_html": True},
              "build": {"cluster": "tcp://127.0.0.1:8786"}}
    study = load_study(study_with(tmp_path, networks=networks, tables=tables, files=files,
                                  study={"title": "T", "summary": "notes/index.md", "seed": 9,
                                         "output": "site"}))
    root = tmp_path.resolve()
    assert (study.seed, study.output, study.summary) == (9, root / "site", root / "notes/index.md")
    n = study.networks[0]
    assert (n.title, n.nodes, n.label, n.directed, n.weight) == (
        "Advice, wave 1", root / "data/staff.csv", "name", True, "times")
    assert (n.weight_means, n.duplicates, n.series, n.wave) == ("distance", "max", "advice", 1)
    assert (n.color_by, n.size_by) == ("community", "pagerank")
    assert study.communities == CommunitiesConfig(
        method="louvain", resolution=2.0, runs=5, perturbations=7, perturb_share=0.25,
        chosen=frozenset({"method", "resolution", "runs", "perturbations", "perturb_share"}))
    assert isinstance(study.communities.resolution, float)
    assert study.significance.null_samples == 0
    assert study.measures == MeasuresConfig(
        exact_paths_up_to=100, path_sample_sources=10,
        chosen=frozenset({"exact_paths_up_to", "path_sample_sources"}))
    assert study.significance.chosen == frozenset({"null_samples"})
    assert study.sharing == SharingConfig(pseudonymize=False, drop=("name",), min_group=3)
    assert study.site == SiteConfig(theme="plain", allow_html=True)
    assert study.build == BuildConfig(cluster="tcp://127.0.0.1:8786")


def test_settings_are_frozen(tmp_path):
    study = load_study(study_with(tmp_path))
    with pytest.raises(AttributeError):
        study.seed = 2  # type: ignore[misc]
    with pytest.raises(AttributeError):
        study.networks[0].directed = True  # type: ignore[misc]


def test_relative_gives_the_path_as_the_user_wrote_it(tmp_path):
    study = load_study(study_with(tmp_path))
    assert study.relative(study.networks[0].edges) == "data/edges.csv"


# ---------------------------------------------------------------------------------------------
# Unknown and missing keys


@pytest.mark.parametrize("where, key, dotted, hint", [
    ("network", "wieght", "network[1].wieght", "did you mean 'weight'?"),
    ("study", "titel", "study.titel", "did you mean 'title'?"),
    ("communities", "metod", "communities.metod", "did you mean 'method'?"),
    ("sharing", "pseudonymise", "sharing.pseudonymise", "did you mean 'pseudonymize'?"),
])
def test_unknown_key_names_the_dotted_key_and_suggests_the_close_one(tmp_path, where, key, dotted,
                                                                     hint):
    study, networks, tables = {"title": "T"}, [net()], {}
    if where == "study":
        study[key] = "x"
    elif where == "network":
        networks = [net(**{key: "x"})]
    else:
        tables = {where: {key: "x"}}
    error = config_error(study_with(tmp_path, study=study, networks=networks, tables=tables))
    assert error.key == dotted
    assert str(error) == f"unknown key '{key}'; {hint}"
    assert error.path == tmp_path.resolve() / "study.toml"
    # The message names the line of study.toml that sets the key, as an editor counts it.
    lines = (tmp_path / "study.toml").read_text(encoding="utf-8").splitlines()
    assert error.line is not None and lines[error.line - 1].startswith(f"{key} =")
    assert error.format_message() == (f"study.toml, line {error.line}: [{dotted}] unknown key "
                                      f"'{key}'; {hint}")
    assert error.exit_code == 1


def test_unknown_key_without_a_close_match_lists_the_valid_keys(tmp_path):
    error = config_error(study_with(tmp_path, tables={"site": {"zzzz": 1}}))
    assert error.key == "site.zzzz"
    assert str(error) == "unknown key 'zzzz'; valid keys: theme, allow_html, node_views"


def test_unknown_key_in_the_second_network_names_that_network(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(), net(id="other", drected=True)]))
    assert error.key == "network[2].drected"
    assert "did you mean 'directed'?" in str(error)


def test_unknown_top_level_table_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, tables={"comunities": {"runs": 2}}))
    assert error.key == "comunities"
    assert "did you mean 'communities'?" in str(error)


def test_missing_title_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, study={"seed": 3}))
    assert error.key == "study.title"
    assert str(error) == "is required"


def test_missing_study_table_is_refused(tmp_path):
    (tmp_path / "data").mkdir()
    (tmp_path / "data/edges.csv").write_text(EDGES)
    (tmp_path / "study.toml").write_text('[[network]]\nid = "a"\nedges = "data/edges.csv"\n')
    assert config_error(tmp_path).key == "study"


def test_study_without_networks_is_refused(tmp_path):
    (tmp_path / "study.toml").write_text(study_toml())
    assert config_error(tmp_path).key == "network"


def test_missing_study_file_points_to_the_study_toml_reference(tmp_path):
    error = config_error(tmp_path)
    assert "no study.toml" in str(error) and "study.toml reference" in str(error)


def test_invalid_toml_is_a_config_error_naming_the_file(tmp_path):
    (tmp_path / "study.toml").write_text('[study]\ntitle = "unclosed\n')
    error = config_error(tmp_path)
    assert str(error).startswith("is not valid TOML")
    assert error.path == tmp_path.resolve() / "study.toml"


# ---------------------------------------------------------------------------------------------
# Values


@pytest.mark.parametrize("bad_id", ["Advice", "advice w1", "advice_w1", "", "Ω"])
def test_network_id_outside_a_to_z_digits_and_dash_is_refused(tmp_path, bad_id):
    error = config_error(study_with(tmp_path, networks=[net(id=bad_id)]))
    assert error.key == "network[1].id"
    assert "may hold only a-z, 0-9 and '-'" in str(error)


def test_network_id_ending_in_a_newline_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(id="advice\n")]))
    assert error.key == "network[1].id"


def test_network_id_used_twice_is_refused_naming_the_second(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(), net(title="again")]))
    assert error.key == "network[2].id"
    assert str(error) == "id 'advice' is already used by network[1]"


def test_unknown_weight_meaning_is_refused_with_a_suggestion(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(weight_means="distanse")]))
    assert error.key == "network[1].weight_means"
    assert str(error) == ("must be one of strength, distance, got 'distanse'; "
                          "did you mean 'distance'?")


@pytest.mark.parametrize("key, value", [("duplicates", "min"), ("duplicates", "first")])
def test_unknown_duplicate_rule_is_refused(tmp_path, key, value):
    error = config_error(study_with(tmp_path, networks=[net(**{key: value})]))
    assert error.key == f"network[1].{key}"
    assert str(error).startswith("must be one of sum, mean, max")


def test_unknown_community_method_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, tables={"communities": {"method": "leidn"}}))
    assert error.key == "communities.method"
    assert "did you mean 'leiden'?" in str(error)


@pytest.mark.parametrize("table, key, value, message", [
    ("network", "directed", "yes", "must be true or false, got text 'yes'"),
    ("network", "directed", 1, "must be true or false, got a whole number 1"),
    ("study", "seed", "1", "must be a whole number, got text '1'"),
    ("study", "seed", True, "must be a whole number, got true or false True"),
    ("study", "seed", 1.5, "must be a whole number, got a number 1.5"),
    ("communities", "runs", 0, "must be at least 1, got 0"),
    ("communities", "resolution", 0, "must be above 0, got 0.0"),
    ("communities", "resolution", "high", "must be a number, got text 'high'"),
    ("significance", "null_samples", -1, "must be at least 0, got -1"),
    ("sharing", "drop", "name", "must be a list, got text 'name'"),
    ("network", "weight", 3, "must be text, got a whole number 3"),
])
def test_values_of_the_wrong_type_or_range_are_refused(tmp_path, table, key, value, message):
    study, networks, tables = {"title": "T"}, [net()], {}
    if table == "study":
        study[key] = value
        dotted = f"study.{key}"
    elif table == "network":
        networks = [net(**{key: value})]
        dotted = f"network[1].{key}"
    else:
        tables = {table: {key: value}}
        dotted = f"{table}.{key}"
    error = config_error(study_with(tmp_path, study=study, networks=networks, tables=tables))
    assert error.key == dotted
    assert str(error) == message


def test_resolution_that_is_not_a_number_is_refused(tmp_path):
    (tmp_path / "data").mkdir()
    (tmp_path / "data/edges.csv").write_text(EDGES)
    (tmp_path / "study.toml").write_text(study_toml(networks=[net()], perturbations=None)
                                         + "\n[communities]\nresolution = nan\n")
    assert config_error(tmp_path).key == "communities.resolution"


def test_edges_and_matrix_together_are_refused(tmp_path):
    files = {"data/m.csv": ",a,b\na,0,1\nb,1,0\n"}
    error = config_error(study_with(tmp_path, networks=[net(matrix="data/m.csv")], files=files))
    assert error.key == "network[1]"
    assert "exactly one of 'edges'" in str(error)


def test_matrix_with_a_weight_column_is_refused(tmp_path):
    files = {"data/m.csv": ",a,b\na,0,1\nb,1,0\n"}
    networks = [{"id": "m", "matrix": "data/m.csv", "weight": "w"}]
    assert config_error(study_with(tmp_path, networks=networks, files=files)).key == "network[1]"


def test_missing_data_file_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(edges="data/nothere.csv")]))
    assert error.key == "network[1].edges"
    assert str(error) == "file 'data/nothere.csv' does not exist"


def test_wave_without_series_and_repeated_wave_are_refused(tmp_path):
    error = config_error(study_with(tmp_path / "a", networks=[net(wave=1)]))
    assert error.key == "network[1].wave"
    error = config_error(study_with(tmp_path / "b", networks=[
        net(series="s", wave=1), net(id="two", series="s", wave=1)]))
    assert error.key == "network[2].wave"


def test_size_by_must_name_a_node_measure(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(size_by="pagernak")]))
    assert error.key == "network[1].size_by"
    assert "did you mean 'pagerank'?" in str(error)


def test_two_mode_network_becomes_two_projections_and_its_settings_are_checked(tmp_path):
    study = load_study(study_with(tmp_path / "a", networks=[
        net(id="tm", two_mode=True, modes=["staff", "session"], projection="newman")]))
    assert [n.id for n in study.two_mode] == ["tm"]
    assert [(n.id, n.projected_from, n.projected_mode, n.projection) for n in study.networks] == [
        ("tm-staff", "tm", "staff", "newman"), ("tm-session", "tm", "session", "newman")]
    error = config_error(study_with(tmp_path / "b", networks=[net(two_mode=True, directed=True)]))
    assert error.key == "network[1].directed"
    error = config_error(study_with(tmp_path / "c", networks=[net(projection="shared")]))
    assert error.key == "network[1].projection"
    error = config_error(study_with(tmp_path / "d", networks=[
        net(id="a-b", title="x"), net(id="a", two_mode=True, modes=["b", "c"])]))
    assert error.key == "network[2].id" and "'a-b'" in str(error)


# ---------------------------------------------------------------------------------------------
# Paths stay inside the study folder; the output folder stays apart from the inputs


def test_data_path_leaving_the_study_folder_is_refused(tmp_path):
    (tmp_path / "outside.csv").write_text(EDGES)
    root = study_with(tmp_path / "study", networks=[net(edges="../outside.csv")])
    error = config_error(root)
    assert error.key == "network[1].edges"
    assert "'../outside.csv' lies outside the study folder" in str(error)


def test_node_list_leaving_the_study_folder_is_refused(tmp_path):
    (tmp_path / "people.csv").write_text("id\na\nb\n")
    root = study_with(tmp_path / "study", networks=[net(nodes="../people.csv")])
    assert config_error(root).key == "network[1].nodes"


def test_absolute_data_path_outside_the_study_folder_is_refused(tmp_path):
    (tmp_path / "outside.csv").write_text(EDGES)
    root = study_with(tmp_path / "study", networks=[net(edges=str(tmp_path / "outside.csv"))])
    assert config_error(root).key == "network[1].edges"


def test_symlink_pointing_outside_the_study_folder_is_refused(tmp_path):
    (tmp_path / "outside.csv").write_text(EDGES)
    root = study_with(tmp_path / "study", networks=[net(edges="data/link.csv")])
    os.symlink(tmp_path / "outside.csv", root / "data" / "link.csv")
    error = config_error(root)
    assert error.key == "network[1].edges"
    assert "lies outside the study folder" in str(error)


def test_symlink_inside_the_study_folder_is_allowed(tmp_path):
    root = study_with(tmp_path, networks=[net(edges="data/link.csv")])
    os.symlink(root / "data" / "edges.csv", root / "data" / "link.csv")
    assert load_study(root).networks[0].edges == (root / "data" / "edges.csv").resolve()


@pytest.mark.parametrize("output", [".", "./", "data/.."])
def test_output_folder_equal_to_the_study_folder_is_refused(tmp_path, output):
    error = config_error(study_with(tmp_path, study={"title": "T", "output": output}))
    assert error.key == "study.output"
    assert "may not be the study folder or contain it" in str(error)


def test_output_folder_containing_the_study_folder_is_refused(tmp_path):
    error = config_error(study_with(tmp_path / "study", study={"title": "T", "output": ".."}))
    assert error.key == "study.output"


def test_output_folder_holding_a_data_file_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, study={"title": "T", "output": "data"}))
    assert error.key == "study.output"
    assert str(error) == "'data/edges.csv' lies inside the output folder"


def test_output_folder_holding_the_summary_note_is_refused(tmp_path):
    root = study_with(tmp_path, study={"title": "T", "summary": "site/index.md", "output": "site"},
                      files={"site/index.md": "# Front page\n"})
    assert config_error(root).key == "study.output"


def test_source_and_target_must_be_different_columns(tmp_path):
    root = study_with(tmp_path, networks=[net(source="from", target="from")])
    error = config_error(root)
    assert error.key == "network[1].target" and "self-loop" in str(error)


def test_weight_may_not_name_a_node_column(tmp_path):
    root = study_with(tmp_path, networks=[net(weight="source")])
    assert config_error(root).key == "network[1].weight"


@pytest.mark.parametrize(("where", "key"), [("study", "study.title"), ("network", "network[1].title")])
def test_an_empty_title_is_refused(tmp_path, where, key):
    if where == "study":
        root = study_with(tmp_path, study={"title": "  "})
    else:
        root = study_with(tmp_path, networks=[net(title="")])
    error = config_error(root)
    assert error.key == key and "may not be empty" in str(error)


@pytest.mark.parametrize("key", ["edges", "nodes", "matrix"])
def test_an_empty_path_is_refused_naming_the_key(tmp_path, key):
    keys = {"edges": ""} if key == "edges" else {key: ""}
    if key == "matrix":
        keys = {"edges": None, "matrix": ""}
    network = {k: v for k, v in {**net(), **keys}.items() if v is not None}
    error = config_error(study_with(tmp_path, networks=[network]))
    assert error.key == f"network[1].{key}"
    assert "is empty" in str(error)


def test_an_empty_summary_path_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, study={"title": "T", "summary": ""}))
    assert error.key == "study.summary"


def test_a_label_without_a_node_list_is_refused(tmp_path):
    error = config_error(study_with(tmp_path, networks=[net(label="name")]))
    assert error.key == "network[1].label"
    assert "no 'nodes' key" in str(error)


def test_a_folder_where_a_file_is_expected_is_named_a_folder(tmp_path):
    (tmp_path / "data" / "lists").mkdir(parents=True)
    error = config_error(study_with(tmp_path, networks=[net(nodes="data/lists")]))
    assert error.key == "network[1].nodes"
    assert "'data/lists' is a folder" in str(error)


def test_delimiter_and_decimal_are_read_and_checked(tmp_path):
    study = load_study(study_with(tmp_path / "ok", networks=[net(delimiter=";", decimal=",")]))
    assert (study.networks[0].delimiter, study.networks[0].decimal) == (";", ",")
    assert load_study(study_with(tmp_path / "tab", networks=[net(delimiter="\t")])
                      ).networks[0].delimiter == "\t"
    error = config_error(study_with(tmp_path / "bad", networks=[net(delimiter=":")]))
    assert error.key == "network[1].delimiter"
    error = config_error(study_with(tmp_path / "clash", networks=[net(decimal=",")]))
    assert error.key == "network[1].decimal"
    assert 'set delimiter = ";"' in str(error)


def test_an_adjacency_matrix_is_its_own_kind_of_source(tmp_path):
    root = write_study(tmp_path, networks=[{"id": "m", "matrix": "data/m.csv"}],
                       files={"data/m.csv": ",a,b\na,0,1\nb,1,0\n"})
    (network,) = load_study(root).networks
    assert network.data == MatrixSource(path=tmp_path.resolve() / "data" / "m.csv")
    assert (network.edges, network.weight) == (None, None)


def test_output_folder_outside_the_study_is_refused_and_points_to_out(tmp_path):
    # A study from someone else may not choose where on this machine its site is written.
    root = study_with(tmp_path / "study", study={"title": "T", "output": "../elsewhere"})
    error = config_error(root)
    assert error.key == "study.output" and "lies outside the study folder" in str(error)
    assert "--out" in str(error)


@pytest.mark.parametrize("title", ["Bell\u0007", "Two\nlines", "Tab\there"])
def test_titles_with_control_characters_are_refused(tmp_path, title):
    error = config_error(study_with(tmp_path / "study", study={"title": title}))
    assert error.key == "study.title" and "control character U+00" in str(error)
