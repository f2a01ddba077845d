"""The ``petfall-audit`` command line. ``main(argv) -> int``; no subcommand imports Qt except
``open`` and the bare command, which start the desktop app.

Exit codes: 0 success, 1 runtime failure, 2 invalid input (bad file, bad arguments).
Problems go to stderr one a line; a traceback is never shown for a user's mistake.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from collections.abc import Callable, Iterator, Sequence, Sized
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, TextIO

from petfall_audit import __version__
from petfall_audit.errors import (
    BuildingFileError,
    CatalogueError,
    PetfallError,
    ReportError,
    ValidationFailed,
)

if TYPE_CHECKING:
    from petfall_audit.model import Building
    from petfall_audit.risk import Assessment

__all__ = ["main"]

EXIT_OK = 0
EXIT_FAILURE = 1
EXIT_INVALID = 2


class _Stop(Exception):
    """Ends a subcommand with an exit code after its message went to stderr."""

    def __init__(self, code: int) -> None:
        super().__init__(code)
        self.code = code


# --- shared pieces of the subcommands -----------------------------------------------------------


def _say(*values: object, file: TextIO | None = None, end: str = "\n") -> None:
    """``print`` for messages: names and ids from user files may hold control characters (an
    ANSI escape sequence would act on the terminal), so they are shown as visible escapes."""
    from petfall_audit.safe_text import terminal_safe

    stream = file if file is not None else sys.stdout
    stream.write(terminal_safe(" ".join(str(v) for v in values)) + end)


def _stderr_progress(label: str) -> Callable[[int, int], None]:
    """A ``progress(done, total)`` callback that draws a one-line bar on stderr when it is a tty."""
    tty = sys.stderr.isatty()

    def progress(done: int, total: int) -> None:
        if not tty or total <= 0:
            return
        width = 30
        filled = int(width * done / total)
        sys.stderr.write(f"\r{label} [{'#' * filled}{'.' * (width - filled)}] {done}/{total}")
        if done >= total:
            sys.stderr.write("\n")
        sys.stderr.flush()

    return progress


def _print_problems(exc: PetfallError, path: str) -> None:
    problems = getattr(exc, "problems", None)
    if isinstance(exc, ValidationFailed | CatalogueError) and problems:
        _say(f"{path}: {len(problems)} problem(s):", file=sys.stderr)
        for problem in problems:
            _say(f"  {problem}", file=sys.stderr)
    else:
        _say(f"{path}: {exc}", file=sys.stderr)


def _refuse(message: str) -> _Stop:
    _say(f"petfall-audit: {message}", file=sys.stderr)
    return _Stop(EXIT_INVALID)


def _require_at_least(name: str, value: float | None, low: float) -> None:
    if value is not None and not (math.isfinite(value) and value >= low):
        raise _refuse(f"{name} must be at least {low:g}")


def _check_output(path: str | Path | None) -> None:
    """Refuse (exit 2) before any work an output path whose folder is missing or that is a
    folder, so a long computation never ends in "cannot write"."""
    if not path:
        return
    from petfall_audit.io.atomic import check_writable_path

    try:
        check_writable_path(path)
    except OSError as exc:
        raise _refuse(f"{path}: {exc.strerror}") from None


def _load(path: str) -> Building:
    """The building in ``path``; its problems go to stderr and end the command with exit 2."""
    from petfall_audit.io.building_file import load_building

    try:
        return load_building(Path(path))
    except BuildingFileError as exc:
        _print_problems(exc, path)
        raise _Stop(EXIT_INVALID) from None


def _add_sampling_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--samples", type=int, default=None, metavar="N",
                   help="sampled cats (default 4000)")
    p.add_argument("--seed", type=int, default=None, metavar="S", help="random seed (default 1)")


def _add_table_output_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("--format", choices=("table", "json", "csv"), default="table",
                   help="output format (default: table)")
    p.add_argument("-o", "--output", default=None, metavar="OUT",
                   help="write to OUT instead of standard output")


def _assess(args: argparse.Namespace, building: Building, *, sensitivity: bool = False,
            label: str = "assessing") -> Assessment:
    from petfall_audit.risk import assess
    from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED
    from petfall_audit.sensitivity import with_sensitivity

    _check_sampling(args, building)
    assessment = assess(
        building,
        samples=DEFAULT_SAMPLES if args.samples is None else args.samples,
        seed=DEFAULT_SEED if args.seed is None else args.seed,
        progress=_stderr_progress(label),
    )
    return with_sensitivity(assessment) if sensitivity else assessment


def _check_sampling(args: argparse.Namespace, building: Building | None = None) -> None:
    """Refuse a negative seed, fewer than one sample, or more samples than fit in memory."""
    from petfall_audit.risk import MAX_FALLS, max_samples

    _require_at_least("--samples", args.samples, 1)
    _require_at_least("--seed", args.seed, 0)
    if building is not None and args.samples is not None:
        n_open = len(building.openings)
        most = max_samples(n_open)
        if args.samples > most:
            raise _refuse(
                f"--samples {args.samples} is too many for {n_open} opening(s): at most "
                f"{MAX_FALLS:,} simulated falls fit in memory at once; use --samples {most} "
                "or fewer"
            )


def _emit(text: str, output: str | None, *, table: bool = False) -> None:
    """Write ``text`` atomically to ``output``, or to standard output. A ``table`` for people,
    and anything written to a terminal, shows control characters instead of obeying them."""
    if output:
        from petfall_audit.io.atomic import atomic_write_text

        atomic_write_text(output, text)
        _say(f"wrote {output}")
    else:
        from petfall_audit.safe_text import terminal_safe

        # on a terminal, control characters from the file are shown, not obeyed
        sys.stdout.write(terminal_safe(text) if table or sys.stdout.isatty() else text)


def _count(items: Sized, noun: str) -> str:
    """``"1 floor"``, ``"3 floors"``."""
    return f"{len(items)} {noun}{'' if len(items) == 1 else 's'}"


def _dumps(doc: object) -> str:
    return json.dumps(doc, indent=2, ensure_ascii=False) + "\n"


def _flush_c_stdout() -> None:
    """Flush the C library's stdout buffer, where compiled libraries print."""
    try:
        import ctypes

        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError, TypeError):  # no C library handle on this platform
        pass


@contextmanager
def _library_chatter_to_stderr() -> Iterator[None]:
    """While a command runs, what compiled libraries print on file descriptor 1 goes to stderr,
    and Python's ``sys.stdout`` still writes to the real standard output.

    Some builds of the MILP solver print internal diagnostic lines on descriptor 1; they would
    corrupt JSON or CSV that a command writes to standard output. Only the command line does
    this (a process-wide change): the library itself never touches descriptors. Skipped when
    ``sys.stdout`` is not the process's own (captured, redirected in Python).
    """
    original = sys.stdout
    own = sys.__stdout__
    if own is None or original is not own:
        yield
        return
    try:
        original.flush()
        _flush_c_stdout()
        real_fd = os.dup(1)
        os.dup2(2, 1)
    except (OSError, ValueError):
        yield
        return
    sys.stdout = open(  # closed in the finally below
        real_fd, "w", buffering=1, encoding=own.encoding, errors=own.errors, closefd=False,
    )
    try:
        yield
    finally:
        sys.stdout.flush()
        sys.stdout.close()
        sys.stdout = original
        _flush_c_stdout()
        os.dup2(real_fd, 1)
        os.close(real_fd)


# --- subcommands --------------------------------------------------------------------------------


def _cmd_check(args: argparse.Namespace) -> int:
    building = _load(args.file)
    _say(
        f"{args.file}: valid — {building.info.name}: {_count(building.floors, 'floor')}, "
        f"{_count(building.facades, 'facade')}, {_count(building.surfaces, 'surface')}, "
        f"{_count(building.openings, 'opening')}"
    )
    return EXIT_OK


def _cmd_assess(args: argparse.Namespace) -> int:
    from petfall_audit.io.results_export import (
        assessment_to_csv,
        assessment_to_dict,
        assessment_to_table,
    )

    _check_output(args.output)
    _check_sampling(args)
    building = _load(args.file)
    assessment = _assess(
        args, building, sensitivity=args.format == "json" and not args.no_sensitivity
    )
    if args.format == "json":
        text = _dumps(assessment_to_dict(assessment))
    elif args.format == "csv":
        text = assessment_to_csv(assessment)
    else:
        text = assessment_to_table(assessment, by=args.by)
    _emit(text, args.output, table=args.format == "table")
    return EXIT_OK


def _cmd_plan(args: argparse.Namespace) -> int:
    from petfall_audit.fixes import load_catalogue
    from petfall_audit.io.plan_export import plan_to_csv, plan_to_dict, plan_to_table
    from petfall_audit.plan import make_plan

    if not math.isfinite(args.budget) or args.budget < 0:
        raise _refuse("--budget must be an amount of 0 or more")
    _check_output(args.output)
    _check_sampling(args)
    building = _load(args.file)
    try:
        catalogue = load_catalogue(args.controls)
    except CatalogueError as exc:
        _print_problems(exc, args.controls)
        return EXIT_INVALID
    except OSError as exc:
        raise _refuse(f"{args.controls}: {exc.strerror or exc}") from None
    plan = make_plan(_assess(args, building), args.budget, catalogue=catalogue)
    if args.format == "json":
        text = _dumps(plan_to_dict(plan))
    elif args.format == "csv":
        text = plan_to_csv(plan)
    else:
        text = plan_to_table(plan)
    _emit(text, args.output, table=args.format == "table")
    return EXIT_OK


def _cmd_report(args: argparse.Namespace) -> int:
    from petfall_audit.plan import make_plan
    from petfall_audit.report import (
        ContactBlock,
        ReportOptions,
        export_results,
        write_audit,
        write_leaflet,
    )

    suffix = Path(args.output).suffix.lower()
    fmt: str = args.format or {".csv": "csv", ".json": "json"}.get(suffix, "pdf")
    _require_at_least("--top", args.top, 0)
    _require_at_least("--budget", args.budget, 0)
    _check_sampling(args)
    _check_output(args.output)
    _check_output(args.leaflet)
    building = _load(args.file)
    assessment = _assess(args, building)
    plan = make_plan(assessment, args.budget) if args.budget is not None else None
    contact = ContactBlock.from_text(args.contact) if args.contact else ContactBlock()
    try:
        if fmt == "pdf":
            written = [write_audit(assessment, plan, args.output, top_n=args.top,
                                   options=ReportOptions(issuer=contact),
                                   photo_root=Path(args.file).parent)]
        else:
            written = export_results(
                assessment, plan, args.output, "csv" if fmt == "csv" else "json"
            )
        if args.leaflet:
            written.append(write_leaflet(assessment, plan, args.leaflet, contact=contact))
    except ReportError as exc:
        _say(f"petfall-audit: {exc}", file=sys.stderr)
        return EXIT_FAILURE
    for path in written:
        _say(f"wrote {path}")
    return EXIT_OK


def _cmd_batch(args: argparse.Namespace) -> int:
    """Assess many buildings; one result file each plus a summary CSV. Bad files are listed
    and skipped; the exit code is 2 if any file could not be assessed. Two files with the same
    name get ``name.json`` and ``name-2.json``; the summary names each result file."""
    import io

    from petfall_audit.cautions import CAUTIONS_SHORT
    from petfall_audit.injury import BANDS
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.csv_safe import csv_writer
    from petfall_audit.io.results_export import assessment_to_csv, assessment_to_dict
    from petfall_audit.plan import make_plan
    from petfall_audit.report import write_audit

    _require_at_least("--budget", args.budget, 0)
    _check_sampling(args)
    out_dir = Path(args.out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise _refuse(f"--out-dir {out_dir}: is a file, not a folder")
    out_dir.mkdir(parents=True, exist_ok=True)
    rows: list[list[object]] = []
    failed = 0
    taken = {"summary"}  # result names in use (case-insensitive, as on some file systems)
    for n, name in enumerate(args.files, 1):
        try:
            building = _load(name)
            assessment = _assess(args, building,
                                 label=f"[{n}/{len(args.files)}] {Path(name).stem}")
        except _Stop:
            failed += 1
            continue
        stem = _unique_stem(Path(name).stem, taken)
        result_path = out_dir / f"{stem}.{args.format}"
        if args.format == "json":
            atomic_write_text(result_path, _dumps(assessment_to_dict(assessment)))
        elif args.format == "csv":
            atomic_write_text(result_path, assessment_to_csv(assessment))
        plan = make_plan(assessment, args.budget) if args.budget is not None else None
        if args.format == "pdf":
            write_audit(assessment, plan, result_path, photo_root=Path(name).parent)
        counts = [0] * len(BANDS)
        for result in assessment.openings:
            counts[result.expected_band] += 1
        worst = assessment.ranked("risk")[0] if assessment.openings else None
        rows.append([
            name, building.info.name, len(building.openings), *counts,
            worst.id if worst else "", f"{float(assessment.risk.sum()):.0f}",
            f"{plan.total_cost:.0f}" if plan else "", f"{plan.risk_after:.0f}" if plan else "",
            result_path.name,
        ])
    buffer = io.StringIO()
    buffer.write(f"# {CAUTIONS_SHORT}\n")
    writer = csv_writer(buffer)
    writer.writerow(["file", "building", "openings", *(f"expected_{b}" for b in BANDS),
                     "highest_risk_opening", "risk_total", "plan_cost", "risk_after_plan",
                     "result_file"])
    writer.writerows(rows)
    atomic_write_text(out_dir / "summary.csv", buffer.getvalue())
    _say(f"assessed {len(rows)} of {len(args.files)} building(s); wrote {out_dir / 'summary.csv'}")
    return EXIT_INVALID if failed else EXIT_OK


def _unique_stem(stem: str, taken: set[str]) -> str:
    """``stem``, or ``stem-2``, ``stem-3``... when a result of that name (any case) is already
    written, so two buildings never overwrite each other's results; adds it to ``taken``."""
    candidate, k = stem, 1
    while candidate.casefold() in taken:
        k += 1
        candidate = f"{stem}-{k}"
    taken.add(candidate.casefold())
    return candidate


def _cmd_import(args: argparse.Namespace) -> int:
    from petfall_audit.cautions import CAUTIONS_SHORT
    from petfall_audit.io.building_file import save_building, validate_building
    from petfall_audit.io.schedule import (
        apply_import,
        combine_mapping,
        guess_mapping,
        header_units,
        load_mapping,
        preview_import,
        read_table,
    )

    building = _load(args.into)
    table = read_table(Path(args.schedule))
    for note in table.notes:
        _say(f"{args.schedule}: {note}", file=sys.stderr)
    mapping = guess_mapping(table.headers)
    units = header_units(table.headers)
    if args.map:
        loaded = load_mapping(Path(args.map))
        mapping = combine_mapping(mapping, loaded.columns)
        units = {**units, **loaded.units}
    preview = preview_import(table, mapping, building, units=units)
    if preview.problems:
        _say(f"{args.schedule}: {len(preview.problems)} problem(s):", file=sys.stderr)
        for problem in preview.problems:
            _say(f"  {problem}", file=sys.stderr)
        if not args.accept_valid or not preview.openings:
            hint = (
                f"fix the rows above, or import the {len(preview.openings)} valid row(s) with "
                "--accept-valid"
                if preview.openings
                else "fix the problems above (a mapping file may help: --map MAPPING.json)"
            )
            _say(f"{args.schedule}: nothing imported; {hint}", file=sys.stderr)
            return EXIT_INVALID
    updated = apply_import(building, preview, mode=args.mode, accept_valid_rows=args.accept_valid)
    after = validate_building(updated)
    if after:  # never write a building file that would not load again
        _say(f"{args.into}: the imported building would have {len(after)} problem(s):",
              file=sys.stderr)
        for building_problem in after:
            _say(f"  {building_problem}", file=sys.stderr)
        _say(f"{args.into}: nothing imported", file=sys.stderr)
        return EXIT_INVALID
    save_building(updated, Path(args.into))
    _say(f"{args.schedule} -> {args.into} ({args.mode}): {preview.summary()}")
    _say(
        f"{args.into}: {_count(updated.floors, 'floor')}, {_count(updated.facades, 'facade')}, "
        f"{_count(updated.openings, 'opening')}"
    )
    _say(CAUTIONS_SHORT)
    return EXIT_OK


def _cmd_template(args: argparse.Namespace) -> int:
    from petfall_audit.io.template import template_headers, write_template

    _check_output(args.out)
    write_template(Path(args.out), system=args.units)
    _say(
        f"{args.out}: blank {args.units} schedule, {len(template_headers(args.units))} columns "
        "and one example row to replace"
    )
    return EXIT_OK


def _no_screen() -> bool:
    """True on Linux without a display server and without a Qt platform chosen by hand."""
    env = os.environ
    return (
        sys.platform.startswith("linux")
        and not env.get("DISPLAY")
        and not env.get("WAYLAND_DISPLAY")
        and not env.get("QT_QPA_PLATFORM")
    )


def _cmd_open(args: argparse.Namespace) -> int:
    if _no_screen():
        _say(
            "petfall-audit: there is no screen to show the app on (neither DISPLAY nor "
            "WAYLAND_DISPLAY is set). Start it from a desktop session, or use the commands "
            "that need no screen: petfall-audit --help",
            file=sys.stderr,
        )
        return EXIT_FAILURE
    from petfall_audit.gui.app import run_app  # the only place the CLI reaches Qt

    return run_app(Path(args.file) if getattr(args, "file", None) else None)


# --- the parser ---------------------------------------------------------------------------------


def _build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="petfall-audit",
        description=(
            "Audit a residential building for the risk that a resident cat falls from a balcony "
            "or window. With no command, opens the desktop app on a sample building. "
            "Indicative model only: not a structural or code-compliance assessment."
        ),
    )
    parser.add_argument("--version", action="version", version=f"petfall-audit {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    p = sub.add_parser("check", help="validate a building file")
    p.add_argument("file", help="building file (.json)")
    p.set_defaults(handler=_cmd_check)

    p = sub.add_parser(
        "assess",
        help="rank the openings of a building (table, JSON or CSV)",
        description="Assess FILE and list its openings worst first. Indicative model only.",
    )
    p.add_argument("file", help="building file (.json)")
    _add_table_output_options(p)
    _add_sampling_options(p)
    p.add_argument("--by", choices=("band", "risk"), default="band",
                   help="table order: expected injury band (default) or risk score")
    p.add_argument("--no-sensitivity", action="store_true",
                   help="leave the sensitivity summary out of the JSON (faster)")
    p.set_defaults(handler=_cmd_assess)

    p = sub.add_parser(
        "plan",
        help="choose the controls that remove the most risk within a budget",
        description="Assess FILE and choose at most one control per opening so that the most "
        "risk is removed within AMOUNT. Indicative costs and model only.",
    )
    p.add_argument("file", help="building file (.json)")
    p.add_argument("--budget", type=float, required=True, metavar="AMOUNT",
                   help="budget in the control catalogue's currency")
    _add_table_output_options(p)
    _add_sampling_options(p)
    p.add_argument("--controls", default=None, metavar="FILE",
                   help="control catalogue (.json; default: the shipped catalogue)")
    p.set_defaults(handler=_cmd_plan)

    p = sub.add_parser(
        "report",
        help="write the PDF audit (or CSV/JSON results), optionally a tenant leaflet",
        description="Assess FILE and write the audit report. The openings' photos are read "
                    "from FILE's folder. Indicative model only.",
    )
    p.add_argument("file", help="building file (.json)")
    p.add_argument("-o", "--output", required=True, help="output file (.pdf, .csv or .json)")
    p.add_argument("--format", choices=("pdf", "csv", "json"), default=None,
                   help="output format (default: from the output file's extension, else pdf)")
    p.add_argument("--budget", type=float, default=None, metavar="AMOUNT",
                   help="budget for the fix plan, in the control catalogue's currency")
    p.add_argument("--leaflet", default=None, metavar="PDF", help="also write a tenant leaflet")
    p.add_argument("--contact", default=None, metavar="TEXT",
                   help="issuer's contact block: first line the organisation; separate lines "
                   "with '|' or a newline")
    _add_sampling_options(p)
    p.add_argument("--top", type=int, default=5, metavar="N",
                   help="openings with a detail page (default 5)")
    p.set_defaults(handler=_cmd_report)

    p = sub.add_parser(
        "batch",
        help="assess many building files; one result file each and a summary CSV",
        description="Assess every FILE and write DIR/<name>.json|.csv|.pdf and DIR/summary.csv "
        "(<name>-2... when two files share a name). Files with problems are listed and skipped. "
        "Indicative model only.",
    )
    p.add_argument("files", nargs="+", metavar="FILE", help="building files (.json)")
    p.add_argument("--out-dir", required=True, metavar="DIR", help="folder for the results")
    p.add_argument("--format", choices=("json", "csv", "pdf"), default="json",
                   help="result file per building (default: json)")
    p.add_argument("--budget", type=float, default=None, metavar="AMOUNT",
                   help="also plan fixes within AMOUNT per building")
    _add_sampling_options(p)
    p.set_defaults(handler=_cmd_batch)

    p = sub.add_parser("import", help="import floors and openings from a schedule (.csv or .xlsx)")
    p.add_argument("schedule", help="schedule spreadsheet (.csv or .xlsx)")
    p.add_argument("--into", required=True, metavar="FILE", help="building file to update")
    p.add_argument("--map", metavar="MAPPING.json", help="column mapping (header -> field)")
    p.add_argument(
        "--mode", choices=("merge", "replace"), default="merge",
        help="merge: update matching ids and add new ones (default); replace: replace all openings",
    )
    p.add_argument(
        "--accept-valid", action="store_true",
        help="import the valid rows even when other rows have problems",
    )
    p.set_defaults(handler=_cmd_import)

    p = sub.add_parser("template", help="write a blank opening schedule (.csv or .xlsx)")
    p.add_argument("out", metavar="OUT", help="OUT.csv or OUT.xlsx")
    p.add_argument(
        "--units", choices=("metric", "imperial"), default="metric",
        help="header units: metric (m, mm) or imperial (ft, in)",
    )
    p.set_defaults(handler=_cmd_template)

    p = sub.add_parser("open", help="open a building file in the desktop app")
    p.add_argument("file", nargs="?", help="building file (.json)")
    p.set_defaults(handler=_cmd_open)

    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line with ``argv`` (default ``sys.argv[1:]``); return the exit code."""
    parser = _build_parser()
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse exits 2 on bad arguments, 0 on --help
        return int(exc.code or 0)
    if args.command is None:
        return _cmd_open(argparse.Namespace(file=None))
    try:
        if args.handler is _cmd_open:
            return int(args.handler(args))
        with _library_chatter_to_stderr():
            return int(args.handler(args))
    except _Stop as stop:
        return stop.code
    except PetfallError as exc:
        _say(f"petfall-audit: {exc}", file=sys.stderr)
        return EXIT_INVALID
    except OSError as exc:
        where = f"{exc.filename}: " if exc.filename else ""
        _say(f"petfall-audit: {where}{exc.strerror or exc}", file=sys.stderr)
        return EXIT_FAILURE
    except KeyboardInterrupt:
        _say("\npetfall-audit: interrupted; no output was left half-written", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
