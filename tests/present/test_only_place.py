"""Acceptance of issue 13: no number is formatted for a person outside the presentation layer.

The app (gui/), the PDF and leaflet (report/) and the command line (cli.py) call
:mod:`petfall_audit.present`; a format spec (``f"{x:.1f}"``, ``:,``, ``:.0%``), ``%``
formatting, ``format()`` / ``str.format`` or ``round()`` in their source is a copy in the
making. The scan reads the source with :mod:`ast`, so strings and comments that merely
mention a format do not count.
"""

from __future__ import annotations

import ast
import re
from pathlib import Path

import pytest

import petfall_audit

PACKAGE = Path(petfall_audit.__file__).resolve().parent
SCANNED = sorted([*(PACKAGE / "gui").rglob("*.py"), *(PACKAGE / "report").rglob("*.py"),
                  PACKAGE / "cli.py"])
#: A %-style conversion of a number: %d, %5.1f, %.2g, %e ...
_PERCENT_NUMBER = re.compile(r"%[-+ #0]*\d*(?:\.\d+)?[diouxXeEfFgG]")


def _spec_text(spec: ast.JoinedStr) -> str:
    """The literal part of a format spec; a nested field (``{x:{fmt}}``) reads ``{}``."""
    return "".join(v.value if isinstance(v, ast.Constant) and isinstance(v.value, str) else "{}"
                   for v in spec.values)


def number_formatting(source: str) -> list[tuple[int, str]]:
    """(line, what) of every number formatting in ``source``."""
    found: list[tuple[int, str]] = []
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.FormattedValue) and node.format_spec is not None:
            assert isinstance(node.format_spec, ast.JoinedStr)
            found.append((node.lineno, f"format spec ':{_spec_text(node.format_spec)}'"))
        elif (isinstance(node, ast.BinOp) and isinstance(node.op, ast.Mod)
              and isinstance(node.left, ast.Constant) and isinstance(node.left.value, str)
              and _PERCENT_NUMBER.search(node.left.value)):
            found.append((node.lineno, "%-formatting"))
        elif isinstance(node, ast.Call):
            func = node.func
            if isinstance(func, ast.Name) and func.id in ("format", "round"):
                found.append((node.lineno, f"{func.id}()"))
            elif (isinstance(func, ast.Attribute) and func.attr == "format"
                  and isinstance(func.value, ast.Constant) and isinstance(func.value.value, str)):
                found.append((node.lineno, "str.format()"))
    return found


@pytest.mark.parametrize(("source", "hits"), [
    ('f"{x:.1f} m"', 1), ('f"{n:,}"', 1), ('f"{p:.0%}"', 1), ('f"{v:{fmt}}"', 1),
    ('"%.2f" % x', 1), ('"{:.1f}".format(x)', 1), ("round(x, 1)", 1), ('format(x, ".2g")', 1),
    ('f"{name} of {x}"', 0), ('"a % b" % (1,)', 0), ('"100%"', 0), ("np.round(x)", 0),
    ('"# f\\"{x:.1f}\\" in a comment"', 0),
])
def test_the_scan_finds_what_it_is_meant_to(source: str, hits: int) -> None:
    # Each known form is found once; plain text, a %-sign and numpy's rounding are not.
    assert len(number_formatting(source)) == hits


def test_gui_report_and_cli_format_no_number_themselves() -> None:
    assert len(SCANNED) > 20  # the scan sees the packages (not an empty glob)
    offenders = [f"{path.relative_to(PACKAGE)}:{line}: {what}"
                 for path in SCANNED
                 for line, what in number_formatting(path.read_text(encoding="utf-8"))]
    assert not offenders, "format numbers through petfall_audit.present:\n" + "\n".join(offenders)
