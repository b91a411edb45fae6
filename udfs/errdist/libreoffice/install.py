"""``errdist libreoffice install`` / ``uninstall``: put the Calc functions into a profile.

A LibreOffice user profile (the folder ``-env:UserInstallation`` names; by default
``~/.config/libreoffice/4`` on Linux, ``%APPDATA%\\LibreOffice\\4`` on Windows,
``~/Library/Application Support/LibreOffice/4`` on macOS) gets two generated files and one
line:

- ``user/Scripts/python/errdist_calc.py``: the Python user script
  (:mod:`errdist.libreoffice.script`) with the folders to add to LibreOffice's Python;
- ``user/basic/Standard/ErrdistFunctions.xba``: the Basic wrappers
  (:mod:`errdist.libreoffice.basic`), one per catalog entry;
- the module's name in ``user/basic/Standard/script.xlb`` (the Standard library's list).

Installing again rewrites the two files (a changed catalog or venv is picked up) and adds the
line only when it is missing; ``uninstall`` removes exactly these. Both refuse while
LibreOffice runs with the profile (its ``.lock`` file), which would overwrite the library list
when it closes. Nothing outside the profile is changed; no ``unopkg`` and no root rights are
needed.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import sysconfig
from dataclasses import dataclass
from pathlib import Path

from errdist.libreoffice.basic import MODULE, SCRIPT_FILE, module_xml
from errdist.libreoffice.script import script_text
from errdist.sheet._textfile import replace_text

__all__ = [
    "Installed",
    "default_profile",
    "install",
    "libreoffice_python",
    "site_paths",
    "uninstall",
]

_ELEMENT = f' <library:element library:name="{MODULE}"/>\n'


class InstallError(ValueError):
    """The profile or the Python folders cannot be used (message says what to do)."""


@dataclass(frozen=True)
class Installed:
    """What :func:`install` wrote: the profile, the two files and the Python folders."""

    profile: Path
    script: Path
    module: Path
    paths: tuple[str, ...]


def default_profile() -> Path:
    """LibreOffice's default user profile folder on this platform."""
    if sys.platform.startswith("win"):
        return Path(os.environ.get("APPDATA", Path.home())) / "LibreOffice" / "4"
    if sys.platform == "darwin":
        return Path.home() / "Library" / "Application Support" / "LibreOffice" / "4"
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "libreoffice" / "4"


def libreoffice_python() -> str | None:
    """``major.minor`` of the Python LibreOffice embeds, when it can be found (Debian: the
    system ``python3`` that has the ``uno`` module), else None."""
    for exe in ("/usr/bin/python3",):
        if not Path(exe).exists():
            continue
        try:
            out = subprocess.run(
                [exe, "-c", "import sys, uno; print('%d.%d' % sys.version_info[:2])"],
                capture_output=True,
                text=True,
                timeout=30,
            )
        except (OSError, subprocess.TimeoutExpired):
            return None
        if out.returncode == 0:
            return out.stdout.strip()
    return None


def _venv_site(venv: Path) -> list[str]:
    found = sorted(venv.glob("lib/python3*/site-packages")) + sorted(venv.glob("Lib/site-packages"))
    if not found:
        raise InstallError(
            f"{venv} has no site-packages folder: give the folder of a virtual environment "
            "(made with: /usr/bin/python3 -m venv DIR; DIR/bin/pip install errdist)"
        )
    return [str(p.resolve()) for p in found]


def site_paths(venv: str | os.PathLike[str] | None = None) -> list[str]:
    """The folders LibreOffice's Python needs: errdist's own folder, then the site-packages
    of ``venv`` (default: the environment running this command).

    Raises
    ------
    InstallError
        ``venv`` has no site-packages, or (default environment) its Python version differs
        from LibreOffice's, whose compiled numpy/scipy could not load.
    """
    import errdist

    own = str(Path(errdist.__file__).resolve().parent.parent)
    if venv is not None:
        sites = _venv_site(Path(venv))
    else:
        lo = libreoffice_python()
        here = f"{sys.version_info[0]}.{sys.version_info[1]}"
        if lo is not None and lo != here:
            raise InstallError(
                f"LibreOffice runs Python {lo} but this environment is Python {here}: make a "
                "virtual environment with LibreOffice's Python and name it: /usr/bin/python3 "
                "-m venv ~/.errdist-lo && ~/.errdist-lo/bin/pip install errdist, then "
                "errdist libreoffice install --venv ~/.errdist-lo"
            )
        sites = []
        for key in ("purelib", "platlib"):
            p = str(Path(sysconfig.get_paths()[key]).resolve())
            if p not in sites:
                sites.append(p)
    return [own, *[s for s in sites if s != own]]


def _check_unlocked(profile: Path) -> None:
    if (profile / ".lock").exists():
        raise InstallError(
            f"LibreOffice seems to be running with the profile {profile} ({profile / '.lock'} "
            "exists): close LibreOffice and run the command again"
        )


def _basic_dir(profile: Path) -> Path:
    return profile / "user" / "basic"


def _soffice() -> str | None:
    import shutil

    return shutil.which("soffice") or shutil.which("libreoffice")


def _ensure_standard(profile: Path) -> Path:
    """The Standard library folder of ``profile``; a new profile is first made by LibreOffice
    itself (on its first start LibreOffice replaces a Standard library it did not write)."""
    std = _basic_dir(profile) / "Standard"
    if (std / "script.xlb").exists():
        return std
    exe = _soffice()
    if exe is None:
        raise InstallError(
            f"the LibreOffice profile {profile} does not exist yet and soffice was not found: "
            "start LibreOffice once, close it, and run the command again"
        )
    profile.mkdir(parents=True, exist_ok=True)
    url = profile.resolve().as_uri()
    try:
        subprocess.run(
            [
                exe,
                "--headless",
                "--norestore",
                "--terminate_after_init",
                f"-env:UserInstallation={url}",
            ],
            stdin=subprocess.DEVNULL,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
            timeout=120,
            check=False,
        )
    except (OSError, subprocess.TimeoutExpired) as exc:
        raise InstallError(f"LibreOffice could not create the profile {profile}: {exc}") from None
    if not (std / "script.xlb").exists():
        raise InstallError(
            f"LibreOffice did not create the profile {profile}: start LibreOffice once with "
            "it, close it, and run the command again"
        )
    return std


def _set_listed(xlb: Path, listed: bool) -> None:
    text = xlb.read_text(encoding="utf-8")
    pattern = re.compile(rf'[ \t]*<library:element library:name="{MODULE}"/>[ \t]*\n?')
    present = bool(pattern.search(text))
    if listed and not present:
        text = text.replace("</library:library>", _ELEMENT + "</library:library>")
    elif not listed and present:
        text = pattern.sub("", text)
    else:
        return
    replace_text(xlb, text, encoding="utf-8", newline="\n", prefix=".errdist-")


def install(
    profile: str | os.PathLike[str] | None = None,
    venv: str | os.PathLike[str] | None = None,
) -> Installed:
    """Install (or refresh) the Calc functions into a LibreOffice profile.

    Parameters
    ----------
    profile : path-like, optional
        The profile folder (the one holding ``user/``); default :func:`default_profile`.
        Created when missing.
    venv : path-like, optional
        A virtual environment made with LibreOffice's Python that has errdist's libraries;
        default: the environment running this command (refused when its Python version
        differs from LibreOffice's).

    Returns
    -------
    Installed
    """
    prof = Path(profile) if profile is not None else default_profile()
    _check_unlocked(prof)
    paths = site_paths(venv)
    std = _ensure_standard(prof)
    scripts = prof / "user" / "Scripts" / "python"
    scripts.mkdir(parents=True, exist_ok=True)
    script = scripts / SCRIPT_FILE
    replace_text(script, script_text(paths), encoding="utf-8", newline="\n", prefix=".errdist-")
    module = std / f"{MODULE}.xba"
    replace_text(module, module_xml(), encoding="utf-8", newline="\n", prefix=".errdist-")
    _set_listed(std / "script.xlb", True)
    return Installed(prof, script, module, tuple(paths))


def uninstall(profile: str | os.PathLike[str] | None = None) -> list[Path]:
    """Remove the Calc functions from a profile; returns the files removed."""
    prof = Path(profile) if profile is not None else default_profile()
    _check_unlocked(prof)
    removed = []
    for path in (
        prof / "user" / "Scripts" / "python" / SCRIPT_FILE,
        _basic_dir(prof) / "Standard" / f"{MODULE}.xba",
    ):
        if path.exists():
            path.unlink()
            removed.append(path)
    xlb = _basic_dir(prof) / "Standard" / "script.xlb"
    if xlb.exists():
        _set_listed(xlb, False)
    return removed
