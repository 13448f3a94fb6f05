"""Find a site theme and make the jinja environment that renders its templates.

A theme is a folder with ``templates/`` and ``static/``. ``[site] theme`` names a theme shipped
with netfolio or gives a folder (relative to the study folder) whose files override the default
theme's files of the same name.

A study folder may come from someone else, so its theme is not trusted: its templates run in
jinja's sandbox (no reaching Python's internals from ``{{ ... }}``, so no running commands), the
folder must lie inside the study folder, and a template or static file that is a link leading
out of the theme folder is refused rather than read.
"""

from __future__ import annotations

import dataclasses
import difflib
import hashlib
import os
from collections.abc import Callable
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import TYPE_CHECKING

import jinja2
from jinja2.sandbox import ImmutableSandboxedEnvironment

from ..config import StudyConfig
from ..errors import ConfigError

if TYPE_CHECKING:  # importlib.resources.abc is new in Python 3.11
    from importlib.abc import Traversable

__all__ = ["DEFAULT_THEME", "Theme", "load_theme", "packaged_themes"]

DEFAULT_THEME = "default"
_THEME_KEY = "site.theme"


def _packaged_root() -> Traversable:
    """The themes folder: inside the installed package (``generator.themes``), or, when the code
    runs straight from a source checkout, the ``themes/`` folder beside ``generator/``."""
    # A source checkout's own themes come first: an editable install of another checkout maps
    # ``generator.themes`` to that checkout's folder, whose templates may not match this code.
    checkout = Path(__file__).resolve().parents[2]
    project = checkout / "pyproject.toml"
    if ((checkout / "themes" / "default").is_dir() and project.is_file()
            and 'name = "netfolio"' in project.read_text(encoding="utf-8")):
        return checkout / "themes"
    try:
        return resources.files("generator.themes")
    except ModuleNotFoundError:
        return checkout / "themes"


def packaged_themes() -> list[str]:
    """Names of the themes shipped inside the package, sorted."""
    root = _packaged_root()
    return sorted(entry.name for entry in root.iterdir()
                  if entry.is_dir() and (entry / "templates").is_dir())


def _read_tree(folder: Traversable, prefix: str = "", *, within: Path | None = None
               ) -> dict[str, bytes]:
    """Every file below ``folder`` by relative posix path; hidden files and caches are skipped.
    ``within`` (a study's theme folder): a file or folder that, links resolved, lies outside it
    is a ConfigError, never read."""
    found: dict[str, bytes] = {}
    if not folder.is_dir():
        return found
    for entry in sorted(folder.iterdir(), key=lambda e: e.name):
        if entry.name.startswith(".") or entry.name == "__pycache__":
            continue
        if within is not None:
            _check_within(Path(str(entry)), within)
        if entry.is_dir():
            found.update(_read_tree(entry, f"{prefix}{entry.name}/", within=within))
        else:
            found[prefix + entry.name] = entry.read_bytes()
    return found


def _check_within(path: Path, folder: Path) -> None:
    """Refuse ``path`` unless, links resolved, it lies inside ``folder`` (already resolved)."""
    try:
        inside = path.resolve().is_relative_to(folder)
    except (OSError, RuntimeError):  # a link that leads back to itself
        inside = False
    if not inside:
        raise ConfigError(f"the theme file {path} is a link that leads out of the theme folder "
                          f"{folder}; netfolio reads nothing outside the study: copy the file in",
                          key=_THEME_KEY)


def _check_links(top: Path, folder: Path) -> None:
    """Refuse any link below ``top`` (not followed while looking) that leads out of ``folder``."""
    for parent, dirs, names in os.walk(top):
        for name in sorted(dirs + names):
            path = Path(parent) / name
            if path.is_symlink():
                _check_within(path, folder)


class _ThemeFolderLoader(jinja2.FileSystemLoader):
    """Templates of a study's theme folder; a template that is a link leading out of the theme
    folder ``folder`` is refused (``FileSystemLoader`` already refuses ``..`` in a name)."""

    def __init__(self, templates: Path, folder: Path) -> None:
        super().__init__(str(templates), encoding="utf-8")
        self.folder = folder

    def get_source(self, environment: jinja2.Environment, template: str
                   ) -> tuple[str, str, Callable[[], bool]]:
        source, filename, uptodate = super().get_source(environment, template)
        _check_within(Path(filename), self.folder)
        return source, filename, uptodate


@dataclass(frozen=True)
class Theme:
    """The templates (user folder first, then the default) and the static files of the site."""

    name: str
    environment: jinja2.Environment
    static: dict[str, bytes]  # relative posix path under static/ -> bytes

    def digest(self) -> str:
        """SHA-256 of every template source and static file: what a rebuild must compare."""
        digest = hashlib.sha256()
        for name in sorted(self.environment.list_templates()):
            source, _, _ = self.environment.loader.get_source(self.environment, name)  # type: ignore[union-attr]
            digest.update(f"{name}\0{source}\0".encode())
        for name, data in sorted(self.static.items()):
            digest.update(f"{name}\0".encode() + data + b"\0")
        return digest.hexdigest()

    def check_templates(self) -> None:
        """Compile every template, so ``check`` finds a syntax error before a build does."""
        for template in self.environment.list_templates():
            try:
                self.environment.get_template(template)
            except jinja2.TemplateSyntaxError as exc:
                raise ConfigError(f"template {exc.name or template}, line {exc.lineno}: "
                                  f"{exc.message}", key=_THEME_KEY) from None

    def render(self, template: str, context: object) -> str:
        """Render ``template`` with a page context (a dataclass whose fields the template reads,
        or a mapping); a broken template becomes a ConfigError naming file and line."""
        if dataclasses.is_dataclass(context) and not isinstance(context, type):
            context = {f.name: getattr(context, f.name) for f in dataclasses.fields(context)}
        try:
            return self.environment.get_template(template).render(context)
        except jinja2.TemplateSyntaxError as exc:
            raise ConfigError(f"template {exc.name or template}, line {exc.lineno}: {exc.message}",
                              key=_THEME_KEY) from None
        except jinja2.TemplateError as exc:
            raise ConfigError(f"template {template} of theme '{self.name}' failed: {exc}",
                              key=_THEME_KEY) from None


def _environment(loaders: list[jinja2.BaseLoader], *, sandboxed: bool) -> jinja2.Environment:
    # A theme from the study folder may come from someone else: its templates run in jinja's
    # sandbox (with the default templates beside them, so one that overrides a default renders
    # as the default would). The themes shipped in the package are netfolio's own code and run
    # unsandboxed: the sandbox checks every attribute a template reads, which doubles the time
    # a site of many node pages takes to render.
    kind = ImmutableSandboxedEnvironment if sandboxed else jinja2.Environment
    return kind(
        loader=jinja2.ChoiceLoader(loaders),
        autoescape=True,  # every string from data or config is escaped
        undefined=jinja2.StrictUndefined,  # a misspelt variable fails the build, not the page
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )


def _packaged_loader(name: str) -> tuple[jinja2.BaseLoader, dict[str, bytes]]:
    folder = _packaged_root() / name
    templates = {path: data.decode("utf-8")
                 for path, data in _read_tree(folder / "templates").items()}
    return jinja2.DictLoader(templates), _read_tree(folder / "static")


def load_theme(study: StudyConfig) -> Theme:
    """The theme ``study.site.theme`` names; raise ConfigError (key ``site.theme``) if unknown."""
    name = study.site.theme
    default_loader, static = _packaged_loader(DEFAULT_THEME)
    shipped = packaged_themes()
    if name in shipped:
        if name == DEFAULT_THEME:
            return Theme(name, _environment([default_loader], sandboxed=False), static)
        loader, own_static = _packaged_loader(name)
        return Theme(name, _environment([loader, default_loader], sandboxed=False),
                     {**static, **own_static})

    folder = (study.root / name).resolve() if name.strip() else None
    if folder is not None and not folder.is_relative_to(study.root):
        raise ConfigError(f"the theme folder '{name}' lies outside the study folder "
                          f"{study.root}; netfolio reads nothing outside the study: copy the "
                          "theme into it", key=_THEME_KEY)
    if folder is None or not folder.is_dir():
        close = difflib.get_close_matches(name, shipped, n=1, cutoff=0.5)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        raise ConfigError(f"'{name}' is neither a theme shipped with netfolio "
                          f"({', '.join(shipped)}) nor a folder in the study folder{hint}",
                          key=_THEME_KEY)
    templates, user_static = folder / "templates", folder / "static"
    if not templates.is_dir() and not user_static.is_dir():
        raise ConfigError(f"the theme folder '{name}' holds neither a templates/ nor a static/ "
                          "folder", key=_THEME_KEY)
    loaders: list[jinja2.BaseLoader] = []
    if templates.is_dir():
        _check_within(templates, folder)
        _check_links(templates, folder)
        loaders.append(_ThemeFolderLoader(templates, folder))
    loaders.append(default_loader)
    return Theme(name, _environment(loaders, sandboxed=True),
                 {**static, **_read_tree(Path(user_static), within=folder)})
