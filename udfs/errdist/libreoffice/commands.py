"""``errdist libreoffice install`` and ``errdist libreoffice uninstall``."""

from __future__ import annotations

import argparse
import sys

from errdist.libreoffice.install import install, uninstall

__all__ = ["run"]


def run(args: argparse.Namespace) -> int:
    """Install or remove the Calc functions; prints what was done. Exit 0, or 2 (with one
    line on standard error) when the profile or environment cannot be used."""
    action = getattr(args, "lo_command", None)
    if action == "install":
        done = install(args.profile, args.venv)
        print(f"installed errdist's Calc functions in the LibreOffice profile {done.profile}")
        print(f"  Basic wrappers: {done.module}")
        print(f"  Python script:  {done.script}")
        print("  LibreOffice's Python looks in: " + ", ".join(done.paths))
        print("Start LibreOffice: =ERRDIST_VERSION() in a cell shows the versions in use.")
        return 0
    if action == "uninstall":
        removed = uninstall(args.profile)
        if removed:
            print("removed " + ", ".join(str(p) for p in removed))
        else:
            print("errdist's Calc functions were not installed in that profile")
        return 0
    print("errdist libreoffice: say install or uninstall", file=sys.stderr)
    return 2
