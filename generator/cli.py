"""The ``netfolio`` command line: parse arguments, run a verb, turn errors into exit codes."""

from __future__ import annotations

import argparse
import difflib
import sys
import traceback
from collections.abc import Sequence
from pathlib import Path

from . import __version__
from .errors import DataError, Finding, NetfolioError, UsageError

__all__ = ["main"]

VERBS = ("build", "check", "clean", "watch", "pack")


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]
        raise UsageError(message)


def _parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="netfolio", description="Turn a network-study folder into a complete, "
                     "self-contained report website.")
    parser.add_argument("--version", action="version", version=f"netfolio {__version__}")
    verbs = parser.add_subparsers(dest="verb", metavar="VERB", parser_class=_Parser)
    build = verbs.add_parser("build", help="check the data, compute everything and write the site")
    build.add_argument("project", nargs="?", default=".", help="study folder (default: here)")
    build.add_argument("--out", type=Path, help="write the site here instead of [study] output")
    build.add_argument("--quiet", "-q", action="store_true", help="no progress lines")
    build.add_argument("--fresh", action="store_true",
                       help="ignore the cache of earlier results and write it anew")
    build.add_argument("--jobs", "-j", type=_jobs, metavar="N",
                       help="analyse and draw networks in N worker processes (default: one per "
                       "core; 1 runs everything in this process); the site is the same for any N")
    build.add_argument("--cluster", metavar="ADDRESS",
                       help="analyse and draw networks on the Dask distributed scheduler at "
                       "ADDRESS, e.g. tcp://10.0.0.5:8786 (overrides [build] cluster; needs "
                       "pip install 'netfolio[cluster]')")
    check = verbs.add_parser("check", help="validate study.toml and the data; print every finding")
    check.add_argument("project", nargs="?", default=".", help="study folder (default: here)")
    check.add_argument("--quiet", "-q", action="store_true", help="print errors only")
    clean = verbs.add_parser("clean", help="remove the cache and the site netfolio made")
    clean.add_argument("project", nargs="?", default=".", help="study folder (default: here)")
    watch = verbs.add_parser("watch", help="build, serve a preview of the site on this computer "
                             "and rebuild on every change")
    watch.add_argument("project", nargs="?", default=".", help="study folder (default: here)")
    watch.add_argument("--port", type=_port, default=8150,
                       help="port to serve on (default: 8150; 0 picks a free one)")
    watch.add_argument("--host", default="127.0.0.1",
                       help="address to serve on (default: 127.0.0.1, this computer only)")
    watch.add_argument("--open", action="store_true", help="open the preview in a browser")
    watch.add_argument("--jobs", "-j", type=_jobs, metavar="N",
                       help="analyse and draw networks in N worker processes (default: one per "
                            "core)")
    watch.add_argument("--quiet", "-q", action="store_true",
                       help="no progress lines; one line per rebuild only")
    pack = verbs.add_parser("pack", help="write a partner bundle: a zip of the site with "
                            "respondents' identities protected as [sharing] says")
    pack.add_argument("project", nargs="?", default=".", help="study folder (default: here)")
    pack.add_argument("--out", type=Path,
                      help="write the zip here (default: <study>/bundles/<title>.zip)")
    pack.add_argument("--keep-labels", action="store_true",
                      help="let the network maps name their largest nodes (by code)")
    pack.add_argument("--jobs", "-j", type=_jobs, metavar="N",
                      help="analyse and draw networks in N worker processes (default: one per "
                           "core)")
    pack.add_argument("--quiet", "-q", action="store_true", help="no progress lines")
    return parser


def _jobs(text: str) -> int:
    """A number of worker processes for --jobs: 1 or more."""
    if not text.isdigit() or int(text) < 1:
        raise argparse.ArgumentTypeError(f"'{text}' is not a number of processes (1 or more)")
    return int(text)


def _port(text: str) -> int:
    """A port number for --port; 0 asks the system for a free one."""
    if not text.isdigit() or int(text) > 65535:
        raise argparse.ArgumentTypeError(f"'{text}' is not a port number (0 to 65535)")
    return int(text)


def _suggest_verb(argv: Sequence[str]) -> None:
    first = next((a for a in argv if not a.startswith("-")), None)
    if first is not None and first not in VERBS:
        close = difflib.get_close_matches(first, VERBS, n=1)
        hint = f"; did you mean '{close[0]}'?" if close else f"; use one of: {', '.join(VERBS)}"
        raise UsageError(f"unknown command '{first}'{hint}")


def _print_finding(finding: Finding) -> None:
    print(f"{finding.level:<7} {finding.format()}")


def _build(args: argparse.Namespace) -> int:
    from .build import Progress, Workers, build_study  # heavy imports only when needed

    if args.cluster is not None and not args.cluster.strip():
        raise UsageError("--cluster needs the Dask scheduler's address, e.g. tcp://10.0.0.5:8786")
    if args.cluster is not None and args.jobs is not None:
        raise UsageError("--jobs and --cluster cannot be used together: the cluster decides "
                         "how many workers run")
    result = build_study(args.project, output=args.out, progress=Progress(quiet=args.quiet),
                         fresh=args.fresh, workers=Workers(jobs=args.jobs, cluster=args.cluster))
    if not args.quiet:
        print(f"site written to {result.output / 'index.html'}")
    return 0


def _clean(args: argparse.Namespace) -> int:
    from .build import clean_study

    for removed in clean_study(args.project):
        print(f"removed {removed}")
    return 0


def _check(args: argparse.Namespace) -> int:
    from .build import check_study

    findings: list[Finding] = []
    study = check_study(args.project, report=findings.append)
    if not args.quiet:
        for finding in findings:
            _print_finding(finding)
        nets, found = len(study.networks), len(findings)
        print(f"ok: {nets} {'network' if nets == 1 else 'networks'} checked, {found} "
              f"{'finding' if found == 1 else 'findings'}, no errors")
    return 0


def _watch(args: argparse.Namespace) -> int:
    from .schedule import Workers
    from .watch import watch_study

    return watch_study(args.project, host=args.host, port=args.port, open_browser=args.open,
                       quiet=args.quiet, workers=Workers(jobs=args.jobs))


def _pack(args: argparse.Namespace) -> int:
    from .build import Progress, Workers
    from .pack import SHORT_CAUTION, pack_study

    result = pack_study(args.project, out=args.out, keep_labels=args.keep_labels,
                        progress=Progress(quiet=args.quiet), workers=Workers(jobs=args.jobs))
    if result.new_key:
        print(f"made the study's key {result.key_file} (keep it, never share it: the same key "
              "gives the same codes in every bundle)")
    print(f"checked {result.checked} original values: none is in the bundle")
    print(f"bundle written to {result.path} ({result.files} files, {result.size / 1e6:.1f} MB)")
    print(f"caution: {SHORT_CAUTION}")
    return 0


_HANDLERS = {"build": _build, "check": _check, "clean": _clean, "watch": _watch, "pack": _pack}


def _run(argv: Sequence[str]) -> int:
    _suggest_verb(argv)
    args = _parser().parse_args(argv)
    if args.verb is None:
        _parser().print_help(sys.stderr)
        return 2
    return _HANDLERS[args.verb](args)


def main(argv: Sequence[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        return _run(argv)
    except DataError as exc:
        for finding in exc.findings:
            print(f"error: {finding.format()}", file=sys.stderr)
        print(f"{len(exc.findings)} error(s); nothing was built and the last site is unchanged",
              file=sys.stderr)
        return exc.exit_code
    except NetfolioError as exc:
        print(f"error: {exc.format_message()}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("interrupted; the last site is unchanged", file=sys.stderr)
        return 130
    except Exception:  # a bug: show everything so it can be reported
        traceback.print_exc()
        print("internal error in netfolio; please report it with the traceback above",
              file=sys.stderr)
        return 3


if __name__ == "__main__":
    raise SystemExit(main())
