"""Builds of one study that overlap or are killed: the study lock, leftovers, and restoring the
last site, each exercised with real processes."""

from __future__ import annotations

import errno
import hashlib
import json
import os
import signal
import socket
import subprocess
import sys
import textwrap
import threading
import time
import zipfile
from pathlib import Path

import pytest
from conftest import csv_text, edge_study

from generator.build import build_study
from generator.cli import main
from generator.errors import DataError
from generator.publish import MARKER
from generator.publish import lock as study_lock
from generator.publish.lock import LOCK_NAME

REPO = Path(__file__).resolve().parents[1]


def small_study(root: Path) -> Path:
    """Two clinics' worth of invented referral ties: enough for every page, quick to build."""
    edges = csv_text(("source", "target"), [("c1", "c2"), ("c2", "c3"), ("c3", "c1"),
                                            ("c3", "c4"), ("c4", "c5")])
    return edge_study(root, edges)


def site_bytes(output: Path) -> dict[str, bytes]:
    return {p.relative_to(output).as_posix(): p.read_bytes()
            for p in sorted(output.rglob("*")) if p.is_file()}


def assert_one_complete_site(study: Path) -> None:
    """Exactly one whole site: every file listed in the manifest with a matching hash, nothing
    else beside it, and nothing left by the build (staging, previous copy, lock)."""
    output = study / "output"
    assert (output / "index.html").is_file() and (output / MARKER).is_file()
    manifest = json.loads((output / "manifest.json").read_text(encoding="utf-8"))
    listed = {entry["path"]: entry["sha256"] for entry in manifest["files"]}
    found = site_bytes(output)
    assert set(found) == set(listed) | {"manifest.json"}
    for path, digest in listed.items():
        assert hashlib.sha256(found[path]).hexdigest() == digest, path
    assert sorted(p.name for p in study.glob(".output.*")) == []
    assert not (study / LOCK_NAME).exists()


def start_build(study: Path) -> subprocess.Popen:
    # --fresh: each build writes a whole site, even when the study is unchanged
    return subprocess.Popen([sys.executable, "-m", "generator", "build", str(study), "--quiet",
                             "--fresh"],
                            cwd=REPO, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def run_script(script: Path, *args: str) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, str(script), *args], cwd=REPO,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def finish(process: subprocess.Popen, timeout: float = 60) -> tuple[int, str]:
    _, err = process.communicate(timeout=timeout)
    return process.returncode, err


def assert_outcomes_are_clean(results: list[tuple[int, str]]) -> None:
    codes = [code for code, _ in results]
    assert 3 not in codes, [err for _, err in results]
    assert 0 in codes, [err for _, err in results]
    for code, err in results:
        assert code in (0, 1), err
        if code == 1:  # the loser waited and then named the build holding the lock
            assert "another netfolio build" in err and "process" in err, err


def dead_pid() -> int:
    """The id of a process that has ended and been reaped, so it no longer exists."""
    child = subprocess.Popen([sys.executable, "-c", "pass"])
    child.wait()
    return child.pid


def write_lock(study: Path, pid: int, host: str | None = None) -> Path:
    path = study / LOCK_NAME
    owner = {"pid": pid, "host": host or socket.gethostname(), "since": "2024-03-01T09:30:00Z"}
    path.write_text(json.dumps(owner) + "\n", encoding="utf-8")
    return path


# ---------------------------------------------------------------------------------------------
# Two builds at once


def test_two_builds_started_together_leave_one_complete_site(tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    for _ in range(3):
        builds = [start_build(study), start_build(study)]
        assert_outcomes_are_clean([finish(b) for b in builds])
        assert_one_complete_site(study)


# Both builds import everything first, wait for the same signal, and every rename sleeps first:
# their swaps then overlap for certain, which without a lock made one of them fail with
# FileNotFoundError while it moved or removed the other's previous copy.
SLOW_SWAP = textwrap.dedent("""
    import sys, time
    from pathlib import Path
    import generator.build
    from generator.cli import main

    real_rename = Path.rename
    def slow_rename(self, target):
        time.sleep(0.3)
        return real_rename(self, target)
    Path.rename = slow_rename
    go = Path(sys.argv[1])
    while not go.exists():
        time.sleep(0.005)
    sys.exit(main(["build", sys.argv[2], "--quiet", "--fresh"]))
""")


def test_two_builds_whose_swaps_overlap_never_crash(tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    assert build_study(study).files > 0  # a previous site, so both builds move one aside
    script = tmp_path / "slow_swap.py"
    script.write_text(SLOW_SWAP, encoding="utf-8")
    go = tmp_path / "go"
    builds = [run_script(script, str(go), str(study)) for _ in range(2)]
    time.sleep(2.0)  # both have imported everything by now (a second or so each)
    go.touch()
    assert_outcomes_are_clean([finish(b) for b in builds])
    assert_one_complete_site(study)


# ---------------------------------------------------------------------------------------------
# Locks left behind or held


def test_a_lock_left_by_a_process_that_has_ended_is_taken_over(tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    write_lock(study, dead_pid())
    assert main(["build", str(study), "--quiet"]) == 0
    assert_one_complete_site(study)


def test_a_lock_held_by_a_live_process_makes_the_build_wait_then_fail_naming_it(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    lock = write_lock(study, os.getpid())
    held = lock.read_bytes()
    monkeypatch.setattr(study_lock, "WAIT_SECONDS", 0.4)
    started = time.monotonic()
    assert main(["build", str(study), "--quiet"]) == 1
    assert time.monotonic() - started >= 0.4  # it waited before giving up
    err = capsys.readouterr().err
    assert f"process {os.getpid()}" in err and socket.gethostname() in err
    assert "2024-03-01 09:30:00 UTC" in err and str(lock) in err
    assert "Traceback" not in err
    assert site_bytes(study / "output") == before
    assert lock.read_bytes() == held  # not ours: left exactly as it was


def test_a_lock_from_another_host_is_not_taken_over_and_the_message_says_how_to_remove_it(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture) -> None:
    study = small_study(tmp_path / "study")
    lock = write_lock(study, dead_pid(), host="records-server-2")
    monkeypatch.setattr(study_lock, "WAIT_SECONDS", 0.2)
    assert main(["build", str(study), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert "host records-server-2" in err and f"remove the lock file {lock}" in err
    assert lock.exists() and not (study / "output").exists()


def test_check_does_not_need_the_lock(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    study = small_study(tmp_path / "study")
    write_lock(study, os.getpid())
    assert main(["check", str(study), "--quiet"]) == 0


# ---------------------------------------------------------------------------------------------
# Builds killed partway


# Runs a build whose file writes or renames hang at a chosen point, so the test can kill it there.
HANGING_BUILD = textwrap.dedent("""
    import sys, time
    from pathlib import Path
    from generator.build import build_study

    where, study = sys.argv[1], sys.argv[2]
    if where == "writing":
        real_write = Path.write_bytes
        def write_then_hang(self, data):
            written = real_write(self, data)
            if ".output.building-" in str(self):
                time.sleep(600)
            return written
        Path.write_bytes = write_then_hang
    elif where == "analysing":  # everything computed, nothing of the site written yet
        import generator.build
        real_write_site = generator.build.write_site
        def hang_then_write(*args, **kwargs):
            Path(sys.argv[3]).touch()
            time.sleep(600)
            return real_write_site(*args, **kwargs)
        generator.build.write_site = hang_then_write
    else:  # "renaming": after moving the old site aside (before the new one moves in), or
           # "swapped": after the new site moved in (before the old copy is removed)
        real_rename = Path.rename
        def rename_then_hang(self, target):
            moved = real_rename(self, target)
            if where == "renaming" and Path(target).name == ".output.previous":
                time.sleep(600)
            if where == "swapped" and self.name.startswith(".output.building-"):
                time.sleep(600)
            return moved
        Path.rename = rename_then_hang
    build_study(study, fresh=True)  # a full build, though nothing changed
""")


def kill_when(process: subprocess.Popen, ready, timeout: float = 60) -> None:
    """SIGKILL ``process`` as soon as ``ready()`` is true, and reap it."""
    deadline = time.monotonic() + timeout
    while not ready():
        assert process.poll() is None, process.communicate()[1]
        assert time.monotonic() < deadline, "the build never reached the point to kill it at"
        time.sleep(0.02)
    process.send_signal(signal.SIGKILL)
    process.communicate(timeout=30)
    assert process.returncode == -signal.SIGKILL


def test_a_build_killed_while_writing_leaves_leftovers_the_next_build_removes(
        tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    script = tmp_path / "hang.py"
    script.write_text(HANGING_BUILD, encoding="utf-8")
    process = run_script(script, "writing", str(study))
    kill_when(process, lambda: any(p.is_file() for p in study.glob(".output.building-*/**/*")))
    assert [p.name.startswith(".output.building-") for p in study.glob(".output.*")] == [True]
    assert (study / LOCK_NAME).exists()
    assert site_bytes(study / "output") == before  # the killed build never touched the site
    build_study(study)
    assert_one_complete_site(study)


def test_a_build_killed_between_the_renames_has_its_last_site_restored(tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    script = tmp_path / "hang.py"
    script.write_text(HANGING_BUILD, encoding="utf-8")
    process = run_script(script, "renaming", str(study))
    kill_when(process, lambda: (study / ".output.previous").is_dir())
    assert not (study / "output").exists()
    # A build that then fails on bad data still puts the last site back where it belongs.
    edges = study / "data" / "edges.csv"
    good = edges.read_bytes()
    edges.write_text("source,target\nc1,\n", encoding="utf-8")
    with pytest.raises(DataError):
        build_study(study)
    assert site_bytes(study / "output") == before
    assert not (study / ".output.previous").exists() and not (study / LOCK_NAME).exists()
    edges.write_bytes(good)
    build_study(study)
    assert_one_complete_site(study)


def test_a_build_killed_before_it_writes_anything_leaves_the_site_and_a_lock_the_next_takes_over(
        tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    script = tmp_path / "hang.py"
    script.write_text(HANGING_BUILD, encoding="utf-8")
    reached = tmp_path / "reached"
    process = run_script(script, "analysing", str(study), str(reached))
    kill_when(process, reached.exists)
    assert (study / LOCK_NAME).exists()  # held by a process that no longer exists
    assert sorted(p.name for p in study.glob(".output.*")) == []
    assert site_bytes(study / "output") == before
    assert main(["build", str(study), "--quiet"]) == 0  # the stale lock is taken over
    assert_one_complete_site(study)


def test_a_build_killed_just_after_its_swap_leaves_the_new_site_and_an_old_copy_removed_next(
        tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    script = tmp_path / "hang.py"
    script.write_text(HANGING_BUILD, encoding="utf-8")
    process = run_script(script, "swapped", str(study))
    kill_when(process, lambda: (study / ".output.previous").is_dir()
              and (study / "output" / MARKER).is_file())
    assert site_bytes(study / ".output.previous") == before  # the last site, whole
    manifest = json.loads((study / "output" / "manifest.json").read_text(encoding="utf-8"))
    found = site_bytes(study / "output")
    assert {e["path"]: e["sha256"] for e in manifest["files"]} == {
        path: hashlib.sha256(data).hexdigest() for path, data in found.items()
        if path != "manifest.json"}  # the new site is whole too
    build_study(study)
    assert_one_complete_site(study)


# ---------------------------------------------------------------------------------------------
# A full disk


def _full_disk_after(count: int, where: str):
    """``Path.write_bytes`` that fails as a full disk does once ``count`` files have been
    written to paths holding ``where``."""
    real_write = Path.write_bytes
    written = [0]

    def write_bytes(self: Path, data: bytes) -> int:
        if where in str(self):
            if written[0] >= count:
                raise OSError(errno.ENOSPC, "No space left on device", str(self))
            written[0] += 1
        return real_write(self, data)

    return write_bytes


@pytest.mark.parametrize("count", [0, 5])
def test_a_full_disk_while_writing_the_site_exits_1_naming_the_folder_and_keeps_the_last_site(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture,
        count: int) -> None:
    study = small_study(tmp_path / "study")
    build_study(study)
    before = site_bytes(study / "output")
    monkeypatch.setattr(Path, "write_bytes", _full_disk_after(count, ".output.building-"))
    assert main(["build", str(study), "--quiet", "--fresh"]) == 1
    err = capsys.readouterr().err
    assert "Traceback" not in err and "No space left on device" in err, err
    assert f"beside {study / 'output'}" in err and "the last site is unchanged" in err, err
    assert site_bytes(study / "output") == before
    assert sorted(p.name for p in study.glob(".output.*")) == []  # no half-written site left
    assert not (study / LOCK_NAME).exists()
    monkeypatch.undo()
    build_study(study, fresh=True)
    assert_one_complete_site(study)


# ---------------------------------------------------------------------------------------------
# build, watch and pack against each other, and an editor saving while they run


def start_verb(study: Path, *args: str) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-m", "generator", *args, str(study), "--quiet"],
                            cwd=REPO, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def assert_clean_exit(code: int, err: str) -> None:
    """0, or 1 with a message: the lock held too long by another verb, or a file caught while
    the editor was saving it. Never an internal error."""
    assert code in (0, 1) and "Traceback" not in err, err
    if code == 1:
        assert "another netfolio build" in err or "error: " in err, err


def assert_whole_bundle(path: Path) -> None:
    with zipfile.ZipFile(path) as archive:
        assert archive.testzip() is None
        names = archive.namelist()
        sums = archive.read("SHA256SUMS").decode("utf-8").splitlines()
        for line in sums:
            digest, name = line.split("  ", 1)
            assert hashlib.sha256(archive.read(name)).hexdigest() == digest, name
    assert "index.html" in names and len(sums) == len(names) - 1


def test_build_and_pack_started_together_take_turns_with_the_lock(tmp_path: Path) -> None:
    study = small_study(tmp_path / "study")
    for _ in range(2):
        runs = [start_verb(study, "build", "--fresh"), start_verb(study, "pack")]
        results = [finish(run) for run in runs]
        for code, err in results:
            assert_clean_exit(code, err)
        assert 0 in [code for code, _ in results]
        assert_one_complete_site(study)
    assert_whole_bundle(study / "bundles" / "invented-study.zip")


def _edit(study: Path, stop: threading.Event, saves: list[int]) -> None:
    """An editor saving the note atomically (a new file moved over the old, as most editors
    do) and the edge list in place, in two writes with a pause between, as some editors do."""
    edges = study / "data" / "edges.csv"
    note = study / "notes" / "intro.md"
    whole = edges.read_text(encoding="utf-8")
    count = 0
    while not stop.is_set():
        count += 1
        temporary = note.with_name(f".intro.md.{count}.tmp")
        temporary.write_text(f"# Intro\n\nSave number {count}.\n", encoding="utf-8")
        os.replace(temporary, note)
        with edges.open("w", encoding="utf-8") as handle:
            handle.write(whole[: len(whole) // 2])
            handle.flush()
            time.sleep(0.05)
            handle.write(whole[len(whole) // 2:])
        time.sleep(0.1)
    saves.append(count)


def test_watch_build_and_pack_run_against_each_other_while_an_editor_saves(tmp_path: Path) -> None:
    from test_watch import _wait, _Watch

    study = small_study(tmp_path / "study")
    (study / "notes").mkdir()
    (study / "notes" / "intro.md").write_text("# Intro\n\nFirst words.\n", encoding="utf-8")
    watch = _Watch(study)
    try:
        _wait(lambda: watch.state()["ok"], what="the first build of the preview")
        stop, saves = threading.Event(), []
        editor = threading.Thread(target=_edit, args=(study, stop, saves))
        editor.start()
        try:
            for _ in range(2):
                runs = [start_verb(study, "build", "--fresh"), start_verb(study, "pack")]
                for run in runs:
                    assert_clean_exit(*finish(run, timeout=120))
        finally:
            stop.set()
            editor.join()
        assert saves and saves[0] > 5  # the editor saved all through the builds
        (study / "notes" / "intro.md").write_text("# Intro\n\nLast words.\n", encoding="utf-8")
        _wait(lambda: b"Last words." in watch.get("/notes/intro.html")[2], timeout=60,
              what="the preview to show the last save")
        assert watch.process.poll() is None  # the preview outlived it all
        assert watch.interrupt() == 0
    finally:
        watch.close()
    assert not [line for line in watch.stderr if "Traceback" in line], watch.stderr
    # Whatever the packs that won the lock wrote is whole; one more build and pack of the last
    # save are clean.
    bundle = study / "bundles" / "invented-study.zip"
    if bundle.exists():
        assert_whole_bundle(bundle)
    assert sorted(p.name for p in study.glob("bundles/.*")) == []  # no temporary zip left
    assert main(["build", str(study), "--quiet"]) == 0
    assert_one_complete_site(study)
    assert b"Last words." in (study / "output" / "notes" / "intro.html").read_bytes()
    assert main(["pack", str(study), "--quiet"]) == 0
    assert_whole_bundle(bundle)
