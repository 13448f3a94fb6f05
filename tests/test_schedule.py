"""Parallel and cluster builds: the same site, byte for byte, wherever the networks are analysed
and drawn; clear errors when the cluster cannot be used."""

from __future__ import annotations

import re
import sys
from pathlib import Path

import pytest
from test_build import copy_example, site_files

from generator import schedule
from generator.build import Workers, build_study
from generator.cli import main
from generator.config import BuildConfig, load_study
from generator.errors import ConfigError, UsageError
from generator.schedule import run_in_order, worker_pool


def _square(x: int) -> int:
    return x * x


def _fails_on_three(x: int) -> int:
    if x == 3:
        raise ValueError("three")
    return x


def _quick_example(dest: Path) -> Path:
    """The example study with few rewired networks and perturbed reruns, so builds take
    seconds; every network, figure and page is still there."""
    study = copy_example(dest, null_samples=4)
    toml = study / "study.toml"
    text = toml.read_text("utf-8")
    assert "perturbations = 50" in text
    toml.write_text(text.replace("perturbations = 50", "perturbations = 3"), "utf-8")
    return study


@pytest.fixture(scope="module")
def example(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return _quick_example(tmp_path_factory.mktemp("parallel") / "example")


@pytest.fixture
def short_connect(monkeypatch: pytest.MonkeyPatch) -> None:
    """A refused connection is retried until the timeout; one second is enough here."""
    monkeypatch.setattr(schedule, "CLUSTER_CONNECT_SECONDS", 1)


@pytest.fixture(scope="module")
def one_job_site(example: Path, tmp_path_factory: pytest.TempPathFactory) -> dict[str, bytes]:
    out = tmp_path_factory.mktemp("jobs1") / "site"
    build_study(example, output=out, fresh=True, workers=Workers(jobs=1))
    return site_files(out)


def test_results_come_back_in_item_order_whatever_the_order_they_finish() -> None:
    seen: list[int] = []
    with worker_pool(Workers(jobs=2), 6) as executor:
        assert executor is not None
        results = run_in_order(_square, [5, 4, 3, 2, 1, 0], executor=executor,
                               on_done=lambda i, r: seen.append(i))
    assert results == [25, 16, 9, 4, 1, 0]
    assert sorted(seen) == list(range(6))


def test_one_job_or_a_single_item_runs_in_this_process_without_a_pool() -> None:
    with worker_pool(Workers(jobs=1), 10) as executor:
        assert executor is None
    with worker_pool(Workers(jobs=4), 1) as executor:
        assert executor is None
    assert run_in_order(_square, [1, 2, 3], executor=None) == [1, 4, 9]


def test_a_failing_item_raises_its_own_error_in_the_parent() -> None:
    with worker_pool(Workers(jobs=2), 5) as executor:
        with pytest.raises(ValueError, match="three"):
            run_in_order(_fails_on_three, [1, 2, 3, 4, 5], executor=executor)


def test_two_jobs_give_the_site_of_one_job_byte_for_byte(
        example: Path, one_job_site: dict[str, bytes], tmp_path: Path) -> None:
    out = tmp_path / "site"
    build_study(example, output=out, fresh=True, workers=Workers(jobs=2))
    assert site_files(out) == one_job_site


def test_a_local_dask_cluster_gives_the_site_of_one_job_byte_for_byte(
        example: Path, one_job_site: dict[str, bytes], tmp_path: Path) -> None:
    from distributed import LocalCluster

    # One worker, one thread, in this process: quick to start, and the same code path as a
    # remote scheduler (the address is a real tcp:// one on 127.0.0.1).
    with LocalCluster(n_workers=1, threads_per_worker=1, processes=False, protocol="tcp",
                      host="127.0.0.1", dashboard_address=None) as cluster:
        out = tmp_path / "site"
        build_study(example, output=out, fresh=True,
                    workers=Workers(cluster=cluster.scheduler_address))
    assert site_files(out) == one_job_site


def test_cached_networks_are_not_sent_to_workers(example: Path, tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["build", str(example), "--out", str(tmp_path / "a"), "--jobs", "2"]) == 0
    capsys.readouterr()
    # Another folder: the site is built again, from the cache.
    assert main(["build", str(example), "--out", str(tmp_path / "b"), "--jobs", "2"]) == 0
    second = capsys.readouterr().err
    assert "to analyse and draw" not in second and "[1/" not in second
    assert re.search(r"^analyse\s+advice: cached", second, re.M)
    assert re.search(r"^draw\s+advice: cached", second, re.M)


def test_with_workers_the_parent_reports_each_network_as_it_finishes(
        example: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["build", str(example), "--out", str(tmp_path / "s"), "--jobs", "2",
                 "--fresh"]) == 0
    err = capsys.readouterr().err
    assert re.search(r"^analyse\s+\d+ networks to analyse and draw in 2 worker processes$", err,
                     re.M)
    total = len(load_study(example).networks)
    for net in ("advice", "coworking"):
        assert re.search(rf"^analyse\s+{net}: \d+ measures, .* \[\d+/{total}\] \(", err, re.M)
        assert re.search(rf"^draw\s+{net}: \d+ figures \[\d+/{total}\] \(", err, re.M)
    assert re.search(rf"\[{total}/{total}\]", err)


@pytest.mark.usefixtures("short_connect")
def test_an_unreachable_scheduler_is_a_clear_error_naming_the_option(
        example: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Port 9 on this computer: nothing listens there, so the connection is refused at once.
    code = main(["build", str(example), "--out", str(tmp_path / "s"), "--fresh",
                 "--cluster", "tcp://127.0.0.1:9"])
    err = capsys.readouterr().err
    assert code == 1
    assert err.splitlines()[-1].startswith(
        "error: --cluster tcp://127.0.0.1:9: no Dask scheduler answered within 1 s")
    assert "Traceback" not in err
    assert not (tmp_path / "s").exists()


@pytest.mark.usefixtures("short_connect")
def test_a_cluster_named_in_study_toml_is_used_and_its_key_named_in_errors(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    study = _quick_example(tmp_path / "study")
    toml = study / "study.toml"
    toml.write_text(toml.read_text("utf-8") + '\n[build]\ncluster = "tcp://127.0.0.1:9"\n',
                    "utf-8")
    assert load_study(study).build == BuildConfig(cluster="tcp://127.0.0.1:9")
    assert main(["build", str(study), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert err.startswith("error: [build.cluster] 'tcp://127.0.0.1:9': no Dask scheduler")
    assert "Traceback" not in err
    # --jobs on the command line builds here instead.
    assert main(["build", str(study), "--jobs", "1", "--quiet"]) == 0


def test_without_the_cluster_extra_the_error_says_how_to_install_it(
        example: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture[str]) -> None:
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed fails
    code = main(["build", str(example), "--out", str(tmp_path / "s"), "--fresh",
                 "--cluster", "tcp://127.0.0.1:8786"])
    err = capsys.readouterr().err
    assert code == 1
    assert err.splitlines()[-1] == ("error: --cluster tcp://127.0.0.1:8786: building on a "
                                    "cluster needs the optional Dask packages: pip install "
                                    "'netfolio[cluster]'")
    assert "Traceback" not in err


@pytest.mark.parametrize("argv, message", [
    (["--jobs", "0"], "'0' is not a number of processes"),
    (["--jobs", "two"], "'two' is not a number of processes"),
    (["--jobs", "2", "--cluster", "tcp://127.0.0.1:8786"], "cannot be used together"),
])
def test_bad_jobs_or_cluster_options_are_usage_errors(
        argv: list[str], message: str, example: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["build", str(example), *argv]) == UsageError.exit_code
    assert message in capsys.readouterr().err


def test_an_empty_cluster_key_is_refused_with_its_line(tmp_path: Path) -> None:
    study = _quick_example(tmp_path / "study")
    toml = study / "study.toml"
    toml.write_text(toml.read_text("utf-8") + '\n[build]\ncluster = " "\n', "utf-8")
    with pytest.raises(ConfigError) as caught:
        load_study(study)
    assert caught.value.key == "build.cluster" and caught.value.line is not None


def test_pack_with_two_jobs_gives_the_bundle_of_one_job_byte_for_byte(
        example: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
        capsys: pytest.CaptureFixture[str]) -> None:
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1700000000")  # the same build date in both
    one, two = tmp_path / "one.zip", tmp_path / "two.zip"
    assert main(["pack", str(example), "--out", str(one), "--jobs", "1"]) == 0
    capsys.readouterr()
    assert main(["pack", str(example), "--out", str(two), "--jobs", "2"]) == 0
    err = capsys.readouterr().err
    assert one.read_bytes() == two.read_bytes()
    # The partner figures (drawn without names) were drawn by the workers, each reported.
    total = len(load_study(example).networks)
    assert len(re.findall(r"^draw\s+\S+: \d+ figures", err, re.M)) == total


def test_watch_passes_its_jobs_to_every_rebuild(monkeypatch: pytest.MonkeyPatch,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    import generator.watch as watch

    seen: list[Workers | None] = []

    def fake_watch(project: str, **kwargs: object) -> int:
        seen.append(kwargs["workers"])  # type: ignore[arg-type]
        return 0

    monkeypatch.setattr(watch, "watch_study", fake_watch)
    assert main(["watch", "somewhere", "--jobs", "3"]) == 0
    assert main(["watch", "somewhere"]) == 0
    assert seen == [Workers(jobs=3), Workers(jobs=None)]
    assert main(["watch", "--jobs", "0"]) == 2
    assert "'0' is not a number of processes (1 or more)" in capsys.readouterr().err
