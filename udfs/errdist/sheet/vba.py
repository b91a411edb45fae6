"""The VBA module text (.bas) of errdist's worksheet functions, for manual import.

xlwings' "Import Functions" button writes the VBA wrappers into the workbook itself, which
needs Excel's "Trust access to the VBA project object model". When that setting is off (it
often is, by company policy), ``errdist vba --out errdist_udfs.bas`` writes the same wrappers
to a file the user imports in the VBA editor (File > Import File...).

The wrappers are derived from the catalog and written exactly as xlwings 0.37.8's
``xlwings.udfs.generate_vba_wrapper`` writes them for ``ThisWorkbook`` (the harness tests
compare the two, function by function), with two additions xlwings makes through COM
instead of in the text:

- ``Sub ErrdistRegisterHelp``: run it once (Alt+F8) and save, and Excel's Insert Function
  dialog shows each function's description, category and argument descriptions
  (``Application.MacroOptions``, as xlwings' import does);
- ``ERRDIST_RAND`` calls ``Application.Volatile`` only when its ``seed`` is omitted, so
  seeded draws stay put (xlwings can only mark a whole function volatile).

The wrappers call ``XLPy.CallUDF`` in the xlwings add-in: the workbook still needs the xlwings
add-in (or its VBA module) and the xlwings settings (interpreter, UDF Modules).
"""

from __future__ import annotations

import argparse
import io
import sys
from collections.abc import Iterable
from pathlib import Path
from typing import TextIO

from errdist.sheet._textfile import replace_text
from errdist.sheet.entry import Entry

__all__ = ["MODULE_NAME", "VB_NAME", "main", "vba_module", "write_function", "write_help"]

#: The Python module the wrappers call.
MODULE_NAME = "errdist.sheet.xlwings_udfs"
#: The VBA module's name (kept apart from xlwings' own "xlwings_udfs").
VB_NAME = "errdist_udfs"

_MAX_LINE = 1024  # VBA's physical line limit, as xlwings' VBAWriter uses
_CONDITIONAL_VOLATILE = {"ERRDIST_RAND": "seed"}


class _Writer:
    """Indenting line writer (same layout rules as xlwings' ``VBAWriter``)."""

    def __init__(self, out: TextIO) -> None:
        self.out = out
        self.indent = 0

    def line(self, text: str = "") -> None:
        full = ("    " * self.indent + text) if text else ""
        if len(full) > _MAX_LINE:
            raise ValueError(f"VBA line longer than {_MAX_LINE} characters: {full[:60]}...")
        self.out.write(full + "\n")

    def label(self, text: str) -> None:
        self.indent -= 1
        self.line(text + ":")
        self.indent += 1


def _quote(text: str) -> str:
    """A VBA string literal."""
    return '"' + text.replace('"', '""') + '"'


def write_function(
    entry: Entry, out: TextIO, *, module_name: str = MODULE_NAME, workbook: str = "ThisWorkbook"
) -> None:
    """Write the VBA wrapper of one catalog entry (xlwings' layout)."""
    w = _Writer(out)
    params = ", ".join(("Optional " if p.optional else "") + p.name for p in entry.params)
    args = "Array(" + ", ".join(p.name for p in entry.params) + ")"
    name = entry.name
    w.line(f"Function {name}({params})")
    w.indent += 1
    if not entry.call_in_wizard:
        w.line(
            'If (Not Application.CommandBars("Standard").Controls(1).Enabled) Then Exit Function'
        )
    if entry.volatile:
        w.line("Application.Volatile")
    elif name in _CONDITIONAL_VOLATILE:
        w.line(f"If IsMissing({_CONDITIONAL_VOLATILE[name]}) Then Application.Volatile")
    w.line('#If App = "Microsoft Excel" Then')
    w.indent += 1
    w.line("If TypeOf Application.Caller Is Range Then On Error GoTo failed")
    w.line(
        f'{name} = XLPy.CallUDF("{module_name}", "{name}", {args}, {workbook}, Application.Caller)'
    )
    w.line("Exit Function")
    w.indent -= 1
    w.line("#Else")
    w.indent += 1
    w.line(f'{name} = XLPy.CallUDF("{module_name}", "{name}", {args})')
    w.line("Exit Function")
    w.indent -= 1
    w.line("#End If")
    w.label("failed")
    w.line(f"{name} = Err.Description")
    w.indent -= 1
    w.line("End Function")
    w.line()


def write_help(entries: Iterable[Entry], out: TextIO) -> None:
    """Write ``Sub ErrdistRegisterHelp``: descriptions for the Insert Function dialog."""
    w = _Writer(out)
    w.line("Sub ErrdistRegisterHelp()")
    w.indent += 1
    w.line("' Run once (Alt+F8) and save the workbook: Excel's Insert Function dialog then")
    w.line("' shows the descriptions below, as xlwings' Import Functions would set them.")
    for entry in entries:
        w.line(f"Application.MacroOptions Macro:={_quote(entry.name)}, _")
        w.indent += 1
        tail = ", _" if entry.params else ""
        w.line(f"Description:={_quote(entry.summary)}, _")
        w.line(f"Category:={_quote(entry.category)}{tail}")
        if entry.params:
            docs = [_quote(p.doc) for p in entry.params]
            w.line("ArgumentDescriptions:=Array( _")
            w.indent += 1
            for i, doc in enumerate(docs):
                w.line(doc + (", _" if i < len(docs) - 1 else ")"))
            w.indent -= 1
        w.indent -= 1
    w.indent -= 1
    w.line("End Sub")


def vba_module(entries: Iterable[Entry] | None = None, *, module_name: str = MODULE_NAME) -> str:
    """The whole .bas text (LF line ends; :func:`main` writes CRLF files)."""
    if entries is None:
        from errdist.sheet.catalog import CATALOG

        entries = list(CATALOG.values())
    else:
        entries = list(entries)
    out = io.StringIO()
    out.write(f'Attribute VB_Name = "{VB_NAME}"\n')
    out.write(
        "'Generated by errdist (errdist vba) from its function catalog - "
        "changes will be lost when regenerated.\n"
    )
    out.write("""#Const App = "Microsoft Excel" 'Adjust when using outside of Excel\n""")
    for entry in entries:
        write_function(entry, out, module_name=module_name)
    write_help(entries, out)
    text = out.getvalue()
    if not text.isascii():
        raise ValueError("the VBA module must be plain ASCII (the VBA editor reads ANSI)")
    return text


def main(args: argparse.Namespace) -> int:
    """``errdist vba [--out FILE.bas] [--force]``: print the module, or write it to FILE.

    The file is written atomically (CRLF, ASCII). ``FILE`` must end in ``.bas`` (what the VBA
    editor imports), and an existing file is replaced only with ``--force``; either refusal
    returns exit code 2 and leaves every file as it was.
    """
    text = vba_module()
    out = getattr(args, "out", None)
    if out is None:
        sys.stdout.write(text)
        return 0
    path = Path(out)
    force = bool(getattr(args, "force", False))
    if path.suffix.lower() != ".bas":
        print(
            f"errdist vba: --out must name a .bas file (the VBA editor imports .bas), got {out}",
            file=sys.stderr,
        )
        return 2
    if path.is_dir():
        print(f"errdist vba: {out} is a folder, not a file", file=sys.stderr)
        return 2
    try:
        replace_text(
            path,
            text,
            encoding="ascii",
            newline="\r\n",
            prefix=".errdist-vba-",
            overwrite=force,
        )
    except FileExistsError:
        print(f"errdist vba: {out} exists; use --force to overwrite", file=sys.stderr)
        return 2
    except OSError as exc:
        print(f"errdist vba: cannot write {out}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    print(f"wrote {path} - import it in the VBA editor (File > Import File...)", file=sys.stderr)
    return 0
