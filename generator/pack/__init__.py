"""Partner bundles: a copy of the report site that protects respondents, packed as one zip.

``pack_study`` reuses build's stages (analyses from the cache or computed, then every file of
the site) on protected analyses (``protect.py``), writes the zip beside its target
(``bundle.py``), scans every file in it for original values (``leaks.py``), and only then puts
it in place. The normal site is never touched, and nothing of a bundle is cached.
"""

from __future__ import annotations

import os
import tempfile
import zipfile
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path

import pandas as pd

from ..analyse import NetworkAnalysis
from ..build import (
    Progress,
    Workers,
    build_info_stamp,
    read_notes,
    read_text,
    site_files,
    study_analyses,
    study_relations,
    workers_for,
)
from ..cache import CACHE_DIR, ResultCache, analysis_key
from ..config import StudyConfig, load_study
from ..errors import ConfigError, DataError, OutputError
from ..publish.lock import LockOwner, hold_study_lock
from ..render.site import MEDIA, PartnerCopy
from ..render.site_map import DATAPACKAGE
from ..vocabulary import count_of
from .bundle import bundle_files, write_zip, zip_time
from .codes import StudyKey, node_codes, read_study_key, save_study_key
from .datapackage import partner_datapackage
from .errors import LeakError, PackError
from .leaks import Leak, Secret, SecretMatcher, find_leaks
from .protect import (
    SMALL_GROUP,
    Protection,
    label_column,
    protect_analysis,
    protect_relations,
    protect_study,
    secrets_of,
    shown_values,
    small_groups,
)
from .target import bundle_target
from .wording import CAUTIONS, SHORT_CAUTION, BundleFacts, notice, protections, readme_text

__all__ = ["SHORT_CAUTION", "LeakError", "PackError", "PackResult", "pack_study"]

KEY_KIND = "copy of the study's secret key"
_LEAKS_LISTED = 10


@dataclass(frozen=True)
class PackResult:
    """What a pack wrote: the bundle, its file count and size, how many original values the
    scan searched for, and whether it made the study's key."""

    path: Path
    files: int
    size: int
    checked: int
    key_file: Path
    new_key: bool


def pack_study(project: Path | str, *, out: Path | None = None, keep_labels: bool = False,
               progress: Progress | None = None, workers: Workers | None = None) -> PackResult:
    """Pack the study's partner bundle to ``out`` (default ``<study>/bundles/<slug>.zip``);
    networks the cache lacks are analysed, and every partner figure drawn, where ``workers``
    says (as for a build: ``--jobs``, else ``[build] cluster``, else a process per core).

    Raises ConfigError, DataError, OutputError or PackError for bad input, and LeakError when
    the finished bundle still holds an original value; then nothing is written."""
    progress = progress or Progress(quiet=True)
    study = load_study(project)
    target = bundle_target(study, out)
    terms = _read_terms(study)
    if keep_labels:
        by = "codes" if study.sharing.pseudonymize else "labels as written: people may be named"
        progress.warn(f"--keep-labels: the network maps name their largest nodes, by {by}")
    if not study.sharing.pseudonymize:
        progress.warn("[sharing] pseudonymize = false: node ids (and labels not dropped) are "
                      "shared as written")
    with hold_study_lock(study.root, on_wait=_report_waiting(progress)):
        return _pack_holding_lock(study, target, terms, keep_labels, progress,
                                  workers_for(study, workers))


def _pack_holding_lock(study: StudyConfig, target: Path, terms: str | None, keep_labels: bool,
                       progress: Progress, workers: Workers) -> PackResult:
    keys = {net.id: analysis_key(study, net) for net in study.networks}
    notes, summary = read_notes(study)
    cache = ResultCache(study.root / CACHE_DIR, warn=progress.warn)
    cache.begin_build()
    analyses = study_analyses(study, keys, progress, cache, workers=workers)
    _check_drop(study, analyses)
    key = read_study_key(study.root)
    if key.shared:
        progress.warn(f"{key.path} can be read by other users of this computer; "
                      f"chmod 600 {key.path}")
    sharing = study.sharing
    ids = [str(node) for analysis in analyses for node in analysis.nodes.index]
    protection = Protection(codes=node_codes(ids, key.secret) if sharing.pseudonymize else None,
                            drop=frozenset(sharing.drop), min_group=sharing.min_group)
    secrets = [s for net, a in zip(study.networks, analyses) for s in secrets_of(a, net, protection)]
    # Findings are redacted of every protected value, however short; the scan then searches
    # the files for those of three characters or more (shorter ones occur by chance).
    withheld = SecretMatcher(secrets, min_length=1)
    protected = [protect_analysis(a, net, protection, withheld=withheld)
                 for net, a in zip(study.networks, analyses)]
    shown = set().union(*(shown_values(a) for a in protected))
    searched = [s for s in secrets if s.kind != SMALL_GROUP]
    checked = SecretMatcher(searched, exempt=shown).count
    progress.stage("protect", f"{len(set(ids))} node ids coded" if sharing.pseudonymize
                   else "ids kept as written")

    facts = _facts(study, analyses, protection, keep_labels, checked)
    partner = PartnerCopy(
        notice=notice(facts), terms=terms,
        terms_file=study.relative(sharing.terms) if sharing.terms else "terms",
        protections=protections(facts), cautions=CAUTIONS, contact=facts.contact,
        labels=keep_labels)
    build_info = build_info_stamp()
    # Relations are compared on the full analyses, so the bundle's numbers are the report's.
    relations = [replace(r, comparison=protect_relations(r.comparison, protection))
                 for r in study_relations(study, analyses, progress)]
    site = site_files(protect_study(study, protection), protected, keys, notes=notes,
                      summary=summary, build_info=build_info, progress=progress, cache=None,
                      partner=partner, relations=relations, workers=workers)
    grouped = {f"{a.network_id}-nodes": {c for c in a.attributes if c not in facts.numeric}
               for a in protected}
    site[DATAPACKAGE] = partner_datapackage(site[DATAPACKAGE], pseudonymized=sharing.pseudonymize,
                                            grouped=grouped, min_group=sharing.min_group)
    files = bundle_files(site, readme_text(facts, version=build_info["netfolio"],
                                           built=build_info["built"], terms=terms))
    scan = SecretMatcher([*searched, Secret(KEY_KIND, key.secret.hex())], exempt=shown)
    images = sorted(path for path in site if path.startswith(f"{MEDIA}/"))
    if images:
        go = "goes into the bundle as it is" if len(images) == 1 else "go into the bundle as they are"
        progress.warn(f"{count_of(len(images), 'image')} from the notes {go}; the search for "
                      "original values cannot read names shown in a picture, so look at each "
                      "before sharing: " + ", ".join(images[:5])
                      + (" ..." if len(images) > 5 else ""))
    size = _write_checked(target, files, scan, key)
    progress.stage("pack", f"searched {len(files)} files for {checked} original values: none "
                   f"found; wrote {target} ({size / 1e6:.1f} MB)")
    return PackResult(path=target, files=len(files), size=size, checked=checked,
                      key_file=key.path, new_key=key.new)


def _report_waiting(progress: Progress) -> Callable[[LockOwner], None]:
    def waiting(owner: LockOwner) -> None:
        progress.stage("lock", f"waiting for process {owner.pid} on {owner.host} "
                       f"(since {owner.since_text()}) to finish with the study")
    return waiting


def _read_terms(study: StudyConfig) -> str | None:
    path = study.sharing.terms
    if path is None:
        return None
    if not path.exists():
        raise ConfigError(f"the sharing terms file '{study.relative(path)}' does not exist; "
                          "write it or remove the key", key="sharing.terms", path=study.study_file)
    try:
        return read_text(path, study)
    except DataError as exc:
        raise PackError(f"the sharing terms {exc.format_message()}") from None


def _check_drop(study: StudyConfig, analyses: list[NetworkAnalysis]) -> None:
    """Every column ``[sharing] drop`` names is a column of some node list (when study.toml
    names them; the default list's columns may be missing)."""
    sharing = study.sharing
    if not sharing.drop_given:
        return
    known: set[str] = set()
    for net, analysis in zip(study.networks, analyses):
        if net.nodes is not None:
            known |= {net.node_id, label_column(net), *analysis.attributes}
    for column in sharing.drop:
        if column not in known:
            columns = ", ".join(sorted(known)) if known else "none: no network has a node list"
            raise ConfigError(f"names the column '{column}', which no node list has; the "
                              f"node-list columns are: {columns}", key="sharing.drop",
                              path=study.study_file)


def _facts(study: StudyConfig, analyses: list[NetworkAnalysis], protection: Protection,
           labels: bool, checked: int) -> BundleFacts:
    categorical: dict[str, None] = {}
    numeric: dict[str, None] = {}
    merged: dict[str, set[str]] = {}
    for analysis in analyses:
        for column in analysis.attributes:
            if column in protection.drop:
                continue
            is_number = pd.api.types.is_numeric_dtype(analysis.nodes[column].dtype)
            (numeric if is_number else categorical)[column] = None
        for column, values in small_groups(analysis, protection).items():
            merged.setdefault(column, set()).update(values)
    present = {c for a in analyses for c in a.attributes} | {label_column(n) for n in study.networks}
    contact = study.sharing.contact.rstrip(".") if study.sharing.contact else None
    return BundleFacts(
        title=study.title, pseudonymized=protection.codes is not None,
        removed=tuple(c for c in study.sharing.drop if c in present),
        min_group=protection.min_group,
        merged=tuple((c, len(v)) for c, v in sorted(merged.items())),
        categorical=tuple(categorical), numeric=tuple(c for c in numeric if c not in categorical),
        labels=labels, checked=checked, contact=contact)


def _write_checked(target: Path, files: dict[str, bytes], scan: SecretMatcher,
                   key: StudyKey) -> int:
    """Write the zip to a temporary file beside ``target``, read every file back out of it and
    scan it; only a clean bundle replaces ``target`` (and saves a new key). Returns its size."""
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        handle, name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".packing",
                                        dir=target.parent)
        os.close(handle)
    except OSError as exc:
        raise _write_error(target, exc) from None
    temporary = Path(name)
    try:
        try:
            write_zip(temporary, files, date_time=zip_time(os.environ.get("SOURCE_DATE_EPOCH")))
        except OSError as exc:
            raise _write_error(target, exc) from None
        with zipfile.ZipFile(temporary) as archive:
            written = {entry: archive.read(entry) for entry in archive.namelist()}
        leaks = find_leaks(written, scan)
        if leaks:
            raise LeakError(_leak_message(leaks), leaks=[(leak.file, leak.kind) for leak in leaks])
        try:
            if key.new:
                save_study_key(key)
            os.chmod(temporary, 0o644)  # as any file the user makes; mkstemp's is 0600
            os.replace(temporary, target)
        except OSError as exc:
            raise _write_error(target, exc) from None
    except BaseException:
        temporary.unlink(missing_ok=True)
        raise
    return target.stat().st_size


def _write_error(target: Path, exc: OSError) -> OutputError:
    """The error for a bundle that could not be written (a full disk, a read-only folder)."""
    reason = exc.strerror or str(exc)
    return OutputError(f"could not write the bundle {target} in {target.parent} ({reason}); "
                       "nothing was replaced: free some space or fix the folder's permissions "
                       "and pack again")


def _leak_message(leaks: list[Leak]) -> str:
    shown = "; ".join(f"{leak.file} holds a {leak.kind}" for leak in leaks[:_LEAKS_LISTED])
    more = len(leaks) - _LEAKS_LISTED
    shown += f"; and {more} more" if more > 0 else ""
    return (f"the bundle would give away what it must protect, so it was deleted: {shown}. "
            "Remove the value from the note or file that shows it (values are not printed here) "
            "and pack again")
