"""The malformed-study corpus: every folder of tests/bad_studies/ is a small broken (or oddly
written) study, run through the command line as a user runs it, ``build`` and ``check``.

Each folder's ``expected.toml`` holds:

- ``exit``: the exit code (1 for refused input; 0 for input netfolio accepts with a fix or a
  warning, such as trailing empty spreadsheet columns);
- ``message``: a fragment the output must hold, and ``messages``: more fragments;
  ``build_message``: what ``build`` prints instead, for accepted input (a build shows the count
  of fixes, ``check`` each fix);
- ``where``: optional, ``file:line:column``; for study.toml the column is the dotted key
  (``study.toml:12:communities.perturb_share``), and line or column may be left empty;
- ``out``: optional, the output folder passed with ``--out``, relative to the study (the output
  cases); ``commands``: optional, the verbs to run (default both);
- ``pending``: optional, why the case is skipped for now (a message that is known to fall short);
- ``[recipe]``: what git could mangle or cannot hold, made in the copy before running:
  ``latin1`` / ``utf16`` (files re-encoded), ``hex`` (files written as these bytes), ``huge`` (the
  token @HUGE@ in CSV files replaced by that many characters), ``outside`` (files written beside
  the study, outside it) and ``symlink`` (links made, link -> target).

Every run copies the folder to a temporary one first (nothing is built inside tests/) and checks:
the exit code, the fragments, no traceback, every study file unchanged (hashed before and after),
and for a refused build an existing site in the output folder left byte for byte as it was.

Starting Python and importing netfolio's dependencies costs over a second, which for 200 runs
would be minutes; so the runs are forked from one process that has imported them already (a
"zygote"), each child running ``python -m generator`` exactly as the interpreter does
(``runpy.run_module("generator", run_name="__main__")``) with its own stdout, stderr and exit code.
``test_plain_subprocess_gives_the_same_result`` runs a few cases as a fresh ``python -m
generator`` too; NETFOLIO_CORPUS_PLAIN=1 runs them all that way.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import subprocess
import sys
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest
import tomllib

CORPUS = Path(__file__).parent / "bad_studies"
CASES = sorted(p.name for p in CORPUS.iterdir() if (p / "expected.toml").is_file())
ALLOWED_NEW = (".netfolio-cache", ".netfolio-lock")  # what any run may add to a study folder
PLAIN = os.environ.get("NETFOLIO_CORPUS_PLAIN") == "1"

GOOD_STUDY = """[study]
title = "Invented good study"

[[network]]
id = "good"
edges = "data/edges.csv"

[significance]
null_samples = 0

[communities]
perturbations = 0
runs = 2
"""

ZYGOTE = r"""
import json, os, runpy, sys, traceback
import generator.build, generator.cli  # the heavy imports, done once
for line in sys.stdin:
    job = json.loads(line)
    sys.stdout.flush()
    sys.stderr.flush()
    pid = os.fork()
    if pid == 0:
        code = 99
        try:
            out = os.open(job["stdout"], os.O_WRONLY | os.O_CREAT | os.O_TRUNC)
            err = os.open(job["stderr"], os.O_WRONLY | os.O_CREAT | os.O_TRUNC)
            os.dup2(out, 1)
            os.dup2(err, 2)
            os.chdir(job["cwd"])
            sys.argv = ["generator", *job["argv"]]
            try:
                runpy.run_module("generator", run_name="__main__", alter_sys=True)
                code = 0
            except SystemExit as exc:
                code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
            except BaseException:
                traceback.print_exc()
        finally:
            sys.stdout.flush()
            sys.stderr.flush()
            os._exit(code)
    _, status = os.waitpid(pid, 0)
    print(json.dumps({"rc": os.waitstatus_to_exitcode(status)}), flush=True)
"""


@dataclass(frozen=True)
class Run:
    rc: int
    stdout: str
    stderr: str

    @property
    def text(self) -> str:
        return self.stdout + self.stderr


class Zygote:
    """A process with netfolio imported that forks one child per command line."""

    def __init__(self, workdir: Path):
        self.workdir = workdir
        self.count = 0
        self.process = subprocess.Popen([sys.executable, "-c", ZYGOTE], stdin=subprocess.PIPE,
                                        stdout=subprocess.PIPE, text=True)

    def run(self, argv: list[str], cwd: Path) -> Run:
        self.count += 1
        out, err = self.workdir / f"{self.count}.out", self.workdir / f"{self.count}.err"
        assert self.process.stdin is not None and self.process.stdout is not None
        self.process.stdin.write(json.dumps({"argv": argv, "cwd": str(cwd), "stdout": str(out),
                                             "stderr": str(err)}) + "\n")
        self.process.stdin.flush()
        reply = json.loads(self.process.stdout.readline())
        return Run(reply["rc"], out.read_text(encoding="utf-8"), err.read_text(encoding="utf-8"))

    def close(self) -> None:
        assert self.process.stdin is not None
        self.process.stdin.close()
        self.process.wait(timeout=30)


def plain_run(argv: list[str], cwd: Path) -> Run:
    done = subprocess.run([sys.executable, "-m", "generator", *argv], cwd=cwd, capture_output=True,
                          text=True, timeout=300,
                          env={**os.environ, "PYTHONPATH": str(Path(__file__).parents[1])})
    return Run(done.returncode, done.stdout, done.stderr)


@pytest.fixture(scope="module")
def zygote(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Zygote]:
    runner = Zygote(tmp_path_factory.mktemp("zygote"))
    yield runner
    runner.close()


@pytest.fixture(scope="module")
def good_site(tmp_path_factory: pytest.TempPathFactory, zygote: Zygote) -> Path:
    """A site built from a good study: each refused build's output folder starts as a copy."""
    root = tmp_path_factory.mktemp("good")
    (root / "study" / "data").mkdir(parents=True)
    (root / "study" / "study.toml").write_text(GOOD_STUDY, encoding="utf-8")
    (root / "study" / "data" / "edges.csv").write_text("source,target\nx,y\ny,z\n",
                                                       encoding="utf-8")
    run = zygote.run(["build", str(root / "study"), "--out", str(root / "site"), "--quiet",
                      "--jobs", "1"], root)
    assert run.rc == 0, run.stderr
    assert (root / "site" / "index.html").is_file()
    return root / "site"


def expected(case: str) -> dict[str, Any]:
    with (CORPUS / case / "expected.toml").open("rb") as handle:
        return tomllib.load(handle)


def prepare(case: str, tmp: Path) -> Path:
    """Copy the case to ``tmp/study`` and apply its recipe; return the study folder."""
    study = tmp / "study"
    shutil.copytree(CORPUS / case, study, ignore=shutil.ignore_patterns("expected.toml"))
    recipe = expected(case).get("recipe", {})
    for rel in recipe.get("latin1", []):
        path = study / rel
        path.write_bytes(path.read_text(encoding="utf-8").encode("latin-1"))
    for rel in recipe.get("utf16", []):
        path = study / rel
        path.write_bytes(path.read_text(encoding="utf-8").encode("utf-16"))
    for rel, hex_bytes in recipe.get("hex", {}).items():
        (study / rel).write_bytes(bytes.fromhex(hex_bytes))
    if "huge" in recipe:
        for path in study.rglob("*.csv"):
            text = path.read_text(encoding="utf-8")
            path.write_text(text.replace("@HUGE@", "x" * recipe["huge"]), encoding="utf-8")
    for rel, text in recipe.get("outside", {}).items():
        path = tmp / "outside" / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    for rel, target in recipe.get("symlink", {}).items():
        link = study / rel
        link.parent.mkdir(parents=True, exist_ok=True)
        link.symlink_to(target)
    return study


def hashes(folder: Path) -> dict[str, str]:
    """Every file under ``folder`` (links by their target text) to a hash of its bytes."""
    found = {}
    for dirpath, dirnames, filenames in os.walk(folder):
        for name in dirnames + filenames:
            path = Path(dirpath) / name
            rel = path.relative_to(folder).as_posix()
            if path.is_symlink():
                found[rel] = "link:" + os.readlink(path)
            elif path.is_file():
                found[rel] = hashlib.sha256(path.read_bytes()).hexdigest()
    return found


def where_fragments(where: str) -> list[str]:
    """``file:line:column`` as the pieces netfolio's messages hold."""
    file, line, column = (where.split(":", 2) + ["", ""])[:3]
    if file == "study.toml":
        pieces = [f"study.toml, line {line}:" if line else "study.toml"]
        return pieces + ([f"[{column}]"] if column else [])
    head = file + (f", line {line}" if line else "")
    if column and line:
        return [f"{head}, column '{column}'"]
    return [head] + ([f"column '{column}'"] if column else [])


def run_case(case: str, command: str, tmp: Path, zygote: Zygote, good_site: Path) -> None:
    want = expected(case)
    if "pending" in want:
        pytest.skip(f"pending: {want['pending']}")
    study = prepare(case, tmp)
    before = hashes(study)
    outside_before = hashes(tmp / "outside") if (tmp / "outside").exists() else {}
    argv = [command, str(study)]
    site: Path | None = None
    if command == "build":
        if "out" in want:
            argv += ["--out", str(study / want["out"])]
        else:
            site = tmp / "site"
            shutil.copytree(good_site, site)
            argv += ["--out", str(site)]
        argv += ["--jobs", "1"]
    run = (plain_run if PLAIN else zygote.run)(argv, tmp)
    report = f"{case} {command}: exit {run.rc}\n--- stdout\n{run.stdout}\n--- stderr\n{run.stderr}"

    assert run.rc == want["exit"], report
    assert "Traceback" not in run.stderr, report
    assert "internal error" not in run.stderr, report
    message = want.get("build_message", want["message"]) if command == "build" else want["message"]
    for fragment in [message, *want.get("messages", [])]:
        assert fragment in run.text, f"missing {fragment!r}\n{report}"
    if "where" in want and not (command == "build" and "build_message" in want):
        for fragment in where_fragments(want["where"]):
            assert fragment in run.text, f"missing {fragment!r}\n{report}"

    after = hashes(study)
    for rel, digest in before.items():
        assert after.get(rel) == digest, f"{rel} changed or went missing\n{report}"
    added = [rel for rel in after if rel not in before
             and rel.split("/")[0] not in ALLOWED_NEW
             and not (want.get("out") and rel.startswith(want["out"].strip("./") + "/"))]
    assert added == [], report
    if outside_before:
        assert hashes(tmp / "outside") == outside_before, report
    if site is not None:
        if want["exit"] == 0:
            assert (site / "index.html").is_file(), report
        else:
            assert hashes(site) == hashes(good_site), f"the last site changed\n{report}"


@pytest.mark.parametrize("case", CASES)
def test_build(case: str, tmp_path: Path, zygote: Zygote, good_site: Path) -> None:
    if "build" not in expected(case).get("commands", ["build", "check"]):
        pytest.skip("a check-only case")
    run_case(case, "build", tmp_path, zygote, good_site)


@pytest.mark.parametrize("case", CASES)
def test_check(case: str, tmp_path: Path, zygote: Zygote, good_site: Path) -> None:
    if "check" not in expected(case).get("commands", ["build", "check"]):
        pytest.skip("a build-only case")
    run_case(case, "check", tmp_path, zygote, good_site)


def test_the_corpus_covers_every_kind_of_problem() -> None:
    kinds = {case.split("-")[0] for case in CASES}
    assert len(CASES) >= 60
    assert {"config", "file", "value", "path", "matrix", "two", "several"} <= kinds
    pending = [case for case in CASES if "pending" in expected(case)]
    assert len(pending) <= 8, pending


@pytest.mark.parametrize("case", ["several-problems-in-several-networks"])
def test_plain_subprocess_gives_the_same_result(case: str, tmp_path: Path, zygote: Zygote) -> None:
    """The forked runs are what a fresh ``python -m generator`` prints and returns."""
    study = prepare(case, tmp_path)
    argv = ["check", str(study)]
    forked, plain = zygote.run(argv, tmp_path), plain_run(argv, tmp_path)
    assert (forked.rc, forked.stdout, forked.stderr) == (plain.rc, plain.stdout, plain.stderr)
    assert forked.rc == expected(case)["exit"]
