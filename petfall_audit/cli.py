"""The ``petfall-audit`` command line. ``main(argv) -> int``; no subcommand imports Qt except
``open`` and the bare command, which start the desktop app.

Exit codes: 0 success, 1 runtime failure, 2 invalid input (bad file, bad arguments).
Problems go to stderr one a line; a traceback is never shown for a user's mistake.
"""

from __future__ import annotations

import argparse
import math
import os
import re
import sys
from collections.abc import Callable, Iterator, Sequence, Sized
from contextlib import contextmanager
from pathlib import Path
from typing import IO, TYPE_CHECKING, NoReturn, TextIO

from petfall_audit import __version__
from petfall_audit._collector import few_collections, freeze_survivors
from petfall_audit.errors import (
    BuildingFileError,
    CatalogueError,
    PetfallError,
    ReportError,
    ValidationFailed,
)

if TYPE_CHECKING:
    from petfall_audit.batch import BuildingOutcome
    from petfall_audit.compare import Comparison
    from petfall_audit.fixes import Catalogue
    from petfall_audit.model import Building
    from petfall_audit.plan import Plan
    from petfall_audit.report.leaflet_sections import LeafletChoice
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
    from petfall_audit.batch import describe_problems

    _say(describe_problems(exc, path), file=sys.stderr)


def _refuse(message: str) -> _Stop:
    _say(f"petfall-audit: {message}", file=sys.stderr)
    return _Stop(EXIT_INVALID)


def _require_at_least(name: str, value: float | None, low: float) -> None:
    if value is not None and not (math.isfinite(value) and value >= low):
        from petfall_audit.present import fmt_tick

        raise _refuse(f"{name} must be at least {fmt_tick(low)}")


#: An amount with its thousands grouped by spaces, underscores or apostrophes ("250 000").
_GROUPED = re.compile(r"\d{1,3}(?:[ _'\u00a0\u202f]\d{3})+(?:\.\d+)?")


def _amount(text: str) -> float:
    """An amount of money from the command line (``--budget 250000``, ``250 000``, ``1e5``);
    a plain-words refusal for one that cannot be read without guessing (``5,000`` is five
    thousand in one country and five in another) or is not a finite number."""
    t = text.strip()
    if _GROUPED.fullmatch(t):
        t = re.sub(r"[ _'\u00a0\u202f]", "", t)
    try:
        value = float(t)
    except ValueError:
        hint = (" (a comma separates thousands in some countries and decimals in others)"
                if "," in t else "")
        raise argparse.ArgumentTypeError(
            f"{text!r} is not an amount{hint}: write digits, e.g. 5000 or 5000.50, in the "
            "control catalogue's currency, without its sign") from None
    if not math.isfinite(value):
        raise argparse.ArgumentTypeError(f"{text!r} is not a finite amount")
    return value


def _check_output(path: str | Path | None, *inputs: str | None) -> None:
    """Refuse (exit 2) before any work an output path whose folder is missing or that is a
    folder, so a long computation never ends in "cannot write", and one that is one of the
    command's ``inputs`` (a results file written over the building file would lose it)."""
    if not path:
        return
    from petfall_audit.io.atomic import check_writable_path, same_file

    for given in inputs:
        if given and same_file(path, given):
            raise _refuse(f"{path}: that is the input file {given} itself; write to another "
                          "file, so that the input is kept")
    try:
        check_writable_path(path)
    except OSError as exc:
        raise _refuse(f"{path}: {exc.strerror}") from None


def _keep_edited(path: str | Path | None, force: bool, what: str) -> None:
    """Refuse (exit 2) to replace an existing file at ``path`` that a person fills in or edits
    (``what`` it may hold: a filled-in schedule, an edited leaflet text, the next audit) unless
    ``force``: hours of survey work would be lost to a blank template."""
    if path and not force and Path(path).exists():
        raise _refuse(f"{path} already exists and may hold {what}; give another name, or "
                      "--force to replace it")


def _save_with_photos(building: Building, source: str, target: str) -> None:
    """Save ``building`` (read from the file ``source``) to ``target``; in another folder, its
    photos go with it (:func:`petfall_audit.io.photos.carry_photos`), and a photo not found is
    said on stderr."""
    from petfall_audit.io.building_file import save_building
    from petfall_audit.io.photos import carry_photos

    try:
        building, missing = carry_photos(building, Path(source).parent, Path(target).parent)
    except OSError as exc:
        raise _refuse(f"{target}: the photos could not be copied beside it: "
                      f"{exc.strerror or exc}") from None
    for stored in missing:
        _say(f"{source}: photo {stored!r} not found, so not copied beside {target}",
             file=sys.stderr)
    save_building(building, target)


def _load(path: str) -> Building:
    """The building in ``path``; its problems go to stderr and end the command with exit 2."""
    from petfall_audit.io.building_file import load_building

    try:
        return load_building(Path(path))
    except BuildingFileError as exc:
        _print_problems(exc, path)
        raise _Stop(EXIT_INVALID) from None


def _load_catalogue(path: str | None) -> Catalogue:
    """The control catalogue in ``path`` (``None``: the shipped one); its problems go to stderr
    and end the command with exit 2."""
    from petfall_audit.fixes import load_catalogue

    try:
        return load_catalogue(path)
    except CatalogueError as exc:
        _print_problems(exc, path or "the shipped control catalogue")
        raise _Stop(EXIT_INVALID) from None
    except OSError as exc:
        raise _refuse(f"{path}: {exc.strerror or exc}") from None


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
    from petfall_audit.reassess import assess_deduplicated
    from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED
    from petfall_audit.sensitivity import with_sensitivity

    _check_sampling(args, building)
    # risk.assess exactly; nothing the commands write needs every fall, so none is kept (no
    # copy of the (openings, samples) arrays; the sensitivity simulates what it reports)
    saved = building.plan  # the samples and seed saved with the plan, unless given
    samples = args.samples if args.samples is not None else saved.samples
    seed = args.seed if args.seed is not None else saved.seed
    assessment = assess_deduplicated(
        building,
        samples=DEFAULT_SAMPLES if samples is None else samples,
        seed=DEFAULT_SEED if seed is None else seed,
        progress=_stderr_progress(label),
    )
    return with_sensitivity(assessment) if sensitivity else assessment


def _check_sampling(args: argparse.Namespace, building: Building | None = None) -> None:
    """Refuse a negative seed, fewer than one sample, or more samples than one assessment
    takes (the building's size is never a limit: falls are summarised block by block)."""
    from petfall_audit.sample_counts import MAX_SAMPLES

    _require_at_least("--samples", args.samples, 1)
    _require_at_least("--seed", args.seed, 0)
    if args.samples is not None and args.samples > MAX_SAMPLES:
        from petfall_audit.present import fmt_int

        raise _refuse(f"--samples {args.samples} is too many: at most {fmt_int(MAX_SAMPLES)} "
                      "simulated cats per opening")


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


def _count(items: Sized, one: str, many: str | None = None) -> str:
    """``"1 floor"``, ``"3 floors"``, ``"2 fixes"`` (``many`` where the plural is not ``one``
    + "s"; :func:`petfall_audit.present.numbers.fmt_count`)."""
    from petfall_audit.present.numbers import fmt_count

    return fmt_count(len(items), one, many)


def _flush_c_stdio() -> None:
    """Flush the C library's stdio buffers, where compiled libraries print."""
    try:
        import ctypes

        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError, TypeError):  # no C library handle on this platform
        pass


class _HeldChatter:
    """What compiled libraries wrote on descriptors 1 and 2 while a command ran (see
    :func:`_library_chatter_held`); ``text()`` reads it back."""

    def __init__(self, file: IO[bytes] | None) -> None:
        self._file = file

    def text(self, limit: int = 64_000) -> str:
        if self._file is None:
            return ""
        _flush_c_stdio()
        self._file.seek(0)
        data = self._file.read(limit)
        return data.decode("utf-8", errors="replace").strip()


@contextmanager
def _library_chatter_held() -> Iterator[_HeldChatter]:
    """While a command runs, what compiled libraries print on file descriptors 1 and 2 is held
    in a temporary file, and Python's ``sys.stdout`` / ``sys.stderr`` still write to the real
    standard output and error.

    The MILP solver is asked to stay silent (``disp=False`` in :mod:`petfall_audit.plan`), but
    some builds of it, and other compiled libraries, print diagnostic lines straight on the
    descriptors: they would corrupt JSON or CSV written to standard output and clutter the
    terminal. The caller shows the held text on stderr when the command fails, so a real error
    is never swallowed. Only the command line does this (a process-wide change): the library
    itself never touches descriptors. Skipped when ``sys.stdout`` or ``sys.stderr`` is not the
    process's own (captured or redirected in Python).
    """
    import tempfile

    streams = (sys.stdout, sys.stderr)
    own = (sys.__stdout__, sys.__stderr__)
    if any(o is None or s is not o for s, o in zip(streams, own, strict=True)):
        yield _HeldChatter(None)
        return
    held = tempfile.TemporaryFile()  # closed in the finally below
    saved: list[int] = []
    try:
        for stream in streams:
            stream.flush()
        _flush_c_stdio()
        for fd in (1, 2):
            saved.append(os.dup(fd))
        for fd in (1, 2):
            os.dup2(held.fileno(), fd)
    except (OSError, ValueError):
        for fd, copy in zip((1, 2), saved, strict=False):
            os.dup2(copy, fd)
            os.close(copy)
        held.close()
        yield _HeldChatter(None)
        return
    sys.stdout, sys.stderr = (_text_stream(copy, o) for copy, o in zip(saved, own, strict=True))
    try:
        yield _HeldChatter(held)
    finally:
        for stream in (sys.stdout, sys.stderr):
            _flush_or_drop(stream)
            stream.close()
        sys.stdout, sys.stderr = streams
        _flush_c_stdio()
        for fd, copy in zip((1, 2), saved, strict=True):
            os.dup2(copy, fd)
            os.close(copy)
        held.close()


def _flush_or_drop(stream: TextIO) -> None:
    """Flush ``stream``; when its reader has gone (a pipe closed early, as by ``| head``), what
    is left is dropped: its descriptor is pointed at the null device, so that no later flush
    (at close or at exit) fails."""
    try:
        stream.flush()
    except BrokenPipeError:
        null = os.open(os.devnull, os.O_WRONLY)
        try:
            os.dup2(null, stream.fileno())
        finally:
            os.close(null)
        stream.flush()


def _text_stream(fd: int, like: TextIO | None) -> TextIO:
    """A line-buffered text stream on ``fd`` with the encoding of ``like``; leaves ``fd`` open."""
    return open(  # closed by the caller
        fd, "w", buffering=1, encoding=getattr(like, "encoding", None),
        errors=getattr(like, "errors", None), closefd=False,
    )


def _show_held(held: _HeldChatter) -> None:
    """After a failed command, what libraries printed while it ran (it may explain the failure)."""
    text = held.text()
    if text:
        _say("petfall-audit: a library reported while the command ran:", file=sys.stderr)
        for line in text.splitlines():
            _say(f"  {line}", file=sys.stderr)


# --- subcommands --------------------------------------------------------------------------------


def _cmd_check(args: argparse.Namespace) -> int:
    from petfall_audit.io.building_file import load_building
    from petfall_audit.io.survey import check_warnings
    from petfall_audit.model import Building

    try:
        building = load_building(Path(args.file))
    except ValidationFailed as exc:
        _print_problems(exc, args.file)
        if isinstance(exc.building, Building):
            _print_warnings(check_warnings(exc.building, Path(args.file).parent), args.file)
        return EXIT_INVALID
    except BuildingFileError as exc:
        _print_problems(exc, args.file)
        return EXIT_INVALID
    _say(
        f"{args.file}: valid — {building.info.name}: {_count(building.floors, 'floor')}, "
        f"{_count(building.facades, 'facade')}, {_count(building.surfaces, 'surface')}, "
        f"{_count(building.openings, 'opening')}"
    )
    _print_warnings(check_warnings(building, Path(args.file).parent), args.file,
                    stream=sys.stdout)
    return EXIT_OK


def _print_warnings(warnings: Sequence[object], path: str, *, stream: object = None,
                    limit: int = 50) -> None:
    """Warnings (information still missing), at most ``limit`` of them and a count of the rest."""
    if not warnings:
        return
    out = stream if stream is not None else sys.stderr
    _say(f"{path}: {_count(warnings, 'warning')}: information still missing", file=out)  # type: ignore[arg-type]
    for warning in list(warnings)[:limit]:
        _say(f"  {warning}", file=out)  # type: ignore[arg-type]
    if len(warnings) > limit:
        _say(f"  ... and {len(warnings) - limit} more", file=out)  # type: ignore[arg-type]


def _cmd_assess(args: argparse.Namespace) -> int:
    from petfall_audit.io.results_envelope import results_json_text
    from petfall_audit.io.results_export import assessment_to_csv
    from petfall_audit.present.tables import assessment_to_table

    _check_output(args.output, args.file)
    _check_sampling(args)
    building = _load(args.file)
    assessment = _assess(
        args, building, sensitivity=args.format == "json" and not args.no_sensitivity
    )
    if args.format == "json":
        text = results_json_text(assessment=assessment)
    elif args.format == "csv":
        text = assessment_to_csv(assessment)
    else:
        text = assessment_to_table(assessment, by=args.by)
    _emit(text, args.output, table=args.format == "table")
    return EXIT_OK


def _cmd_plan(args: argparse.Namespace) -> int:
    from petfall_audit.io.plan_export import plan_to_csv
    from petfall_audit.io.results_envelope import results_json_text
    from petfall_audit.plan import make_plan
    from petfall_audit.present.tables import plan_to_table

    if args.budget is not None and (not math.isfinite(args.budget) or args.budget < 0):
        raise _refuse("--budget must be an amount of 0 or more")
    _check_output(args.output, args.file, args.controls)
    _check_output(args.write_after, args.file, args.controls)
    _check_sampling(args)
    building = _load(args.file)
    budget = _budget_of(args, building)
    if budget is None:
        raise _refuse(f"{args.file}: no budget is saved with this audit; give one with --budget")
    catalogue = _load_catalogue(args.controls)
    plan = make_plan(_assess(args, building), budget, catalogue=catalogue)
    if args.write_after:
        from petfall_audit.fix_tracking import apply_plan
        from petfall_audit.present.numbers import plural

        after, left = apply_plan(building, plan, catalogue)
        _save_with_photos(after, args.file, args.write_after)
        _say(f"wrote {args.write_after}: the building with the plan's fixes fitted (a what-if"
             + (f"; {_count(left, 'fix', 'fixes')} that {plural(len(left), 'relies', 'rely')} "
                f"on people or {plural(len(left), 'changes', 'change')} no field left out)"
                if left else ")"), file=sys.stderr)
    if args.format == "json":
        text = results_json_text(plan=plan)
    elif args.format == "csv":
        text = plan_to_csv(plan)
    else:
        text = plan_to_table(plan)
    _emit(text, args.output, table=args.format == "table")
    return EXIT_OK


def _budget_of(args: argparse.Namespace, building: Building) -> float | None:
    """``--budget`` if given, else the budget saved with the audit (``None``: neither)."""
    return float(args.budget) if args.budget is not None else building.plan.budget


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
    inputs = (args.file, args.earlier, getattr(args, "controls", None), args.leaflet_text)
    _check_output(args.output, *inputs)
    _check_output(args.leaflet, *inputs, args.output)
    if (args.leaflet_omit or args.leaflet_text) and not args.leaflet:
        raise _refuse("--leaflet-omit and --leaflet-text shape the leaflet: add --leaflet PDF")
    renamed = _renames(args.rename)
    if renamed and not args.earlier:
        raise _refuse("--rename needs --earlier")
    building = _load(args.file)
    earlier = _load(args.earlier) if args.earlier else None
    choice = _leaflet_choice(args, building) if args.leaflet else None  # before the long work
    assessment = _assess(args, building)
    comparison = None
    if earlier is not None:
        from petfall_audit.compare import compare_assessments

        try:
            same_cats = argparse.Namespace(samples=assessment.samples, seed=assessment.seed)
            comparison = compare_assessments(
                _assess(same_cats, earlier, label="assessing the earlier audit"), assessment,
                renamed=renamed)
        except ValueError as exc:
            raise _refuse(str(exc)) from None
        from petfall_audit.present.comparison import doubt_line, renumbered_line

        for note in (doubt_line(comparison), renumbered_line(comparison)):
            if note:  # said in the PDF too; here so that it is not missed
                _say(f"{args.earlier}: {note}", file=sys.stderr)
    budget = _budget_of(args, building)
    plan = make_plan(assessment, budget) if budget is not None else None
    what_if = None
    if args.what_if:
        if plan is None:
            raise _refuse("--what-if needs a plan: give --budget or save a budget with the audit")
        what_if = _what_if(assessment, plan)
    contact = ContactBlock.from_text(args.contact) if args.contact else ContactBlock()
    try:
        if fmt == "pdf":
            written = [write_audit(assessment, plan, args.output, top_n=args.top,
                                   options=ReportOptions(issuer=contact, comparison=comparison,
                                                         what_if=what_if),
                                   photo_root=Path(args.file).parent)]
        else:
            written = export_results(
                assessment, plan, args.output, "csv" if fmt == "csv" else "json"
            )
        if args.leaflet:
            written.append(write_leaflet(assessment, plan, args.leaflet, contact=contact,
                                         choice=choice))
    except ReportError as exc:
        _say(f"petfall-audit: {exc}", file=sys.stderr)
        return EXIT_FAILURE
    for path in written:
        _say(f"wrote {path}")
    return EXIT_OK


#: Largest edited leaflet text read from a file (bytes): a leaflet is one or two pages.
_LEAFLET_TEXT_MAX_BYTES = 100_000


def _leaflet_choice(args: argparse.Namespace, building: Building) -> LeafletChoice:
    """The leaflet's sections from ``--leaflet-text`` (or the defaults of the building's code
    profile), less those named by ``--leaflet-omit``."""
    from petfall_audit.code_profile import building_profile
    from petfall_audit.report.leaflet_sections import (
        LeafletTextError,
        choose_sections,
        default_sections,
        parse_sections_text,
    )

    defaults = default_sections(building_profile(building))
    sections = defaults
    if args.leaflet_text:
        path = Path(args.leaflet_text)
        try:
            if path.stat().st_size > _LEAFLET_TEXT_MAX_BYTES:
                raise _refuse(f"{args.leaflet_text}: larger than 100 kB: not a leaflet text")
            from petfall_audit.io.text_bytes import decode_text

            text = decode_text(path.read_bytes())
        except (OSError, UnicodeDecodeError) as exc:
            why = getattr(exc, "strerror", None) or "not readable as UTF-8 text"
            raise _refuse(f"{args.leaflet_text}: {why}") from None
        try:
            sections = parse_sections_text(text, defaults)
        except LeafletTextError as exc:
            raise _refuse(f"{args.leaflet_text}: {exc}") from None
    names = [n for item in (args.leaflet_omit or []) for n in item.split(",")]
    try:
        return choose_sections(sections, names)
    except ValueError as exc:
        raise _refuse(f"--leaflet-omit: {exc}") from None


def _cmd_leaflet_text(args: argparse.Namespace) -> int:
    from petfall_audit.code_profile import building_profile
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.report.leaflet_sections import default_sections, sections_text

    building = _load(args.file)
    text = sections_text(default_sections(building_profile(building)))
    if args.output in (None, "-"):
        sys.stdout.write(text)
    else:
        _check_output(args.output, args.file)
        _keep_edited(args.output, args.force, "an edited leaflet text")
        atomic_write_text(Path(args.output), text)
        _say(f"wrote {args.output}")
    return EXIT_OK


def _renames(pairs: Sequence[str] | None) -> dict[str, str]:
    """``--rename OLD=NEW`` pairs as a mapping (exit 2 on a malformed pair)."""
    out: dict[str, str] = {}
    for pair in pairs or ():
        old, sep, new = pair.partition("=")
        if not sep or not old.strip() or not new.strip():
            raise _refuse(f"--rename {pair!r}: expected EARLIER_ID=LATER_ID")
        out[old.strip()] = new.strip()
    return out


def _cmd_compare(args: argparse.Namespace) -> int:
    from petfall_audit.compare import compare_buildings
    from petfall_audit.io.compare_export import (
        comparison_json_text,
        comparison_to_csv,
        comparison_to_table,
    )
    from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED

    _check_output(args.output, args.earlier, args.later)
    _check_sampling(args)
    renamed = _renames(args.rename)
    earlier = _load(args.earlier)
    later = _load(args.later)
    try:
        comparison = compare_buildings(
            earlier, later, renamed=renamed,
            samples=DEFAULT_SAMPLES if args.samples is None else args.samples,
            seed=DEFAULT_SEED if args.seed is None else args.seed,
            progress=_stderr_progress("comparing"),
        )
    except ValueError as exc:
        raise _refuse(str(exc)) from None
    if args.format == "json":
        text = comparison_json_text(comparison)
    elif args.format == "csv":
        text = comparison_to_csv(comparison)
    else:
        text = comparison_to_table(comparison)
    _emit(text, args.output, table=args.format == "table")
    return EXIT_OK


def _cmd_fixes(args: argparse.Namespace) -> int:
    from petfall_audit.fix_tracking import apply_fitted, record_plan, set_fix_status
    from petfall_audit.io._schema import is_iso_date
    from petfall_audit.plan import make_plan
    from petfall_audit.present.changes import fix_status_label

    if args.date and not is_iso_date(args.date):
        raise _refuse(f"--date {args.date!r}: expected a date written YYYY-MM-DD")
    if args.apply_fitted and not args.output:
        raise _refuse("--apply-fitted needs -o NEXT.json (the building as the next audit "
                      "starts; FILE is left as it is)")
    if args.output and not (args.apply_fitted or args.record_plan or args.set):
        raise _refuse("-o: nothing to write; it goes with --record-plan, --set or "
                      "--apply-fitted")
    # --record-plan / --set may write the file back in place; the next audit may not
    _check_output(args.output, args.controls, *((args.file,) if args.apply_fitted else ()))
    if args.apply_fitted:
        _keep_edited(args.output, args.force, "the next audit as surveyed")
    building = _load(args.file)
    catalogue = _load_catalogue(args.controls)
    changed = building
    if args.record_plan:
        budget = _budget_of(args, building)
        if budget is None:
            raise _refuse(f"{args.file}: no budget is saved with this audit; give one with "
                          "--budget")
        plan = make_plan(_assess(args, building), budget, catalogue=catalogue)
        changed = record_plan(changed, plan, date=args.date or building.info.audit_date)
        _say(f"{args.file}: {_count(plan.actions, 'fix', 'fixes')} of the plan recorded as "
             "recommended")
    if args.set:
        from petfall_audit.model import FixStatus

        opening_id, control_id, status = args.set
        if status not in {x.value for x in FixStatus}:
            raise _refuse(f"--set: status {status!r} is not one of "
                          f"{', '.join(x.value for x in FixStatus)}")
        if opening_id not in {o.id for o in building.openings}:
            raise _refuse(f"--set: no opening called {opening_id} in {args.file}")
        if control_id not in {c.id for c in catalogue.controls}:
            raise _refuse(f"--set: no control called {control_id} in the control catalogue")
        changed = set_fix_status(changed, opening_id, control_id, status,
                                 date=args.date or "", note=args.note)
    if changed is not building:
        # -o without --apply-fitted: the updated records go there and FILE is left as it is
        from petfall_audit.io.atomic import same_file

        target = args.output if args.output and not args.apply_fitted else args.file
        _save_with_photos(changed, args.file, target)
        _say(f"wrote {target}" + ("" if same_file(target, args.file)
                                  else f" ({args.file} is left as it is)"))
    if args.apply_fitted:
        from dataclasses import replace

        after, skipped = apply_fitted(changed, catalogue)
        for s in skipped:
            _say(f"{args.file}: {s.record.control_id} on {s.record.opening_id} not applied: "
                 f"{s.reason}", file=sys.stderr)
        after = replace(after, info=replace(after.info, audit_date=args.date or ""))
        _save_with_photos(after, args.file, args.output)
        _say(f"wrote {args.output}: the fitted fixes are the openings' barriers")
        return EXIT_OK
    if not changed.fixes:
        _say(f"{args.file}: no fixes recorded")
    for r in changed.fixes:
        _say(f"{r.opening_id}  {r.control_id}  {fix_status_label(r.status.value)}"
             f"{'  ' + r.date if r.date else ''}{'  ' + r.note if r.note else ''}")
    return EXIT_OK


def _what_if(assessment: Assessment, plan: Plan) -> Comparison:
    """This audit compared with its building after ``plan`` (same cats)."""
    from petfall_audit.compare import compare_assessments
    from petfall_audit.fix_tracking import apply_plan
    from petfall_audit.risk import assess

    after, _ = apply_plan(assessment.building, plan)
    return compare_assessments(assessment, assess(after, samples=assessment.samples,
                                                  seed=assessment.seed,
                                                  progress=_stderr_progress("what-if")))


def _cmd_batch(args: argparse.Namespace) -> int:
    """Assess many buildings; one result file each plus a summary CSV. Bad files are listed
    and skipped; the exit code is 2 if any file could not be assessed. Two files with the same
    name get ``name.json`` and ``name-2.json``; the summary names each result file. ``--jobs``
    buildings are assessed at once in separate processes; the results are the same."""
    # no numpy or scipy here before the workers start: each imports its own
    import io

    from petfall_audit.batch import SUMMARY_COLUMNS, BatchJob, discard, run_all
    from petfall_audit.cautions import CAUTIONS_SHORT
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.csv_safe import csv_writer
    from petfall_audit.sample_counts import DEFAULT_SAMPLES, DEFAULT_SEED

    _require_at_least("--budget", args.budget, 0)
    _require_at_least("--portfolio-budget", args.portfolio_budget, 0)
    _require_at_least("--jobs", args.jobs, 1)
    _check_sampling(args)
    out_dir = Path(args.out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise _refuse(f"--out-dir {out_dir}: is a file, not a folder")
    from petfall_audit.io.atomic import same_file

    inside = [f for f in args.files if same_file(Path(f).parent, out_dir)]
    if inside:  # a result named after its building would be written over the building file
        raise _refuse(f"--out-dir {out_dir}: {inside[0]} is in that folder, and its results "
                      "could be written over it; write the results to a folder of their own "
                      "(e.g. --out-dir results)")
    out_dir.mkdir(parents=True, exist_ok=True)
    files = _once_each(args.files)
    jobs = [
        BatchJob(index=n, path=name, out_dir=str(out_dir), fmt=args.format,
                 samples=DEFAULT_SAMPLES if args.samples is None else args.samples,
                 seed=DEFAULT_SEED if args.seed is None else args.seed, budget=args.budget,
                 want_options=args.portfolio_budget is not None)
        for n, name in enumerate(files)
    ]
    workers = args.jobs if args.jobs is not None else _default_jobs()
    outcomes = run_all(jobs, workers=workers, progress=_stderr_progress("batch"))
    rows: list[list[object]] = []
    done = []
    failed = 0
    taken = {"summary", "portfolio-plan", "portfolio"}  # names in use (any case)
    try:
        for outcome in outcomes:
            if outcome.error is not None:
                _say(outcome.error, file=sys.stderr)
                failed += 1
                continue
            stem = _unique_stem(Path(outcome.path).stem, taken)
            result_path = out_dir / f"{stem}.{args.format}"
            os.replace(outcome.result_tmp, result_path)
            done.append((outcome, result_path.name))
            rows.append(outcome.summary_row(result_path.name))
    finally:
        for outcome in outcomes:
            discard(outcome.result_tmp)
    buffer = io.StringIO()
    buffer.write(f"# {CAUTIONS_SHORT}\n")
    writer = csv_writer(buffer)
    writer.writerow(SUMMARY_COLUMNS)
    writer.writerows(rows)
    atomic_write_text(out_dir / "summary.csv", buffer.getvalue())
    _say(f"assessed {len(rows)} of {_count(files, 'building')}; "
         f"wrote {out_dir / 'summary.csv'}")
    if args.portfolio_budget is not None and not done:
        # an estate plan of no building would read as an estate without risk
        _say("petfall-audit: no building could be assessed, so no estate plan was written",
             file=sys.stderr)
    elif args.portfolio_budget is not None:
        for path in _write_portfolio(done, args.portfolio_budget, out_dir):
            _say(f"wrote {path}")
    return EXIT_INVALID if failed else EXIT_OK


def _once_each(paths: Sequence[str]) -> list[str]:
    """``paths`` with a file given again (the same file, however spelt) left out and said on
    stderr: an estate must not count one building twice."""
    from petfall_audit.io.atomic import file_key

    kept: list[str] = []
    seen: dict[object, str] = {}
    for path in paths:
        key = file_key(path)  # one file, however spelt or linked
        if key in seen:
            _say(f"{path}: the same file as {seen[key]}, given again; assessed once",
                 file=sys.stderr)
            continue
        seen[key] = path
        kept.append(path)
    return kept


def _write_portfolio(done: Sequence[tuple[BuildingOutcome, str]], budget: float,
                     out_dir: Path) -> list[Path]:
    """Plan ``budget`` over every opening of the assessed buildings; write DIR/portfolio-plan.json
    and the estate summary DIR/portfolio.pdf."""
    from petfall_audit.figures.budget import estate_curve
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.results_envelope import results_json_text
    from petfall_audit.portfolio import EstateBuilding, plan_portfolio
    from petfall_audit.report.portfolio import write_portfolio_report

    estate = [EstateBuilding(file=o.path, name=o.building_name, result_file=name,
                             options=o.options or {}, risk_before=o.risk_total)
              for o, name in done]
    currency = next((o.currency for o, _ in done if o.currency), "")
    portfolio = plan_portfolio(estate, budget, currency=currency)
    plan_path = out_dir / "portfolio-plan.json"
    atomic_write_text(plan_path, results_json_text(portfolio=portfolio))
    budgets, removed = estate_curve(estate, budget)
    pdf_path = write_portfolio_report(portfolio, budgets, removed, out_dir / "portfolio.pdf")
    return [plan_path, pdf_path]


def _default_jobs() -> int:
    from petfall_audit.batch import default_jobs

    return default_jobs()


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

    if Path(args.schedule).suffix.lower() == ".ifc":
        return _cmd_import_model(args)
    if args.facade or args.ground:
        raise _refuse("--facade and --ground are for a building model (.ifc) only")
    if not Path(args.into).exists():
        raise _refuse(f"{args.into}: no such building file. A schedule adds floors and openings "
                      "to a building file that already has its facades and what lies below "
                      "them: start one in the app (File > New building, then save it), or "
                      "create one from the building's model (import MODEL.ifc --into FILE)")
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
        _say(f"{args.schedule}: {_count(preview.problems, 'problem')}:", file=sys.stderr)
        for problem in preview.problems:
            _say(f"  {problem}", file=sys.stderr)
        if not args.accept_valid or not preview.openings:
            hint = (
                f"fix the rows above, or import the {_count(preview.openings, 'valid row')} with "
                "--accept-valid"
                if preview.openings
                else "fix the problems above (a mapping file may help: --map MAPPING.json)"
            )
            _say(f"{args.schedule}: nothing imported; {hint}", file=sys.stderr)
            return EXIT_INVALID
    updated = apply_import(building, preview, mode=args.mode, accept_valid_rows=args.accept_valid)
    after = validate_building(updated)
    if after:  # never write a building file that would not load again
        _say(f"{args.into}: the imported building would have {_count(after, 'problem')}:",
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


def _facade_map(pairs: Sequence[str]) -> dict[str, str]:
    mapping: dict[str, str] = {}
    for pair in pairs:
        model_id, sep, file_id = pair.partition("=")
        if not sep or not model_id.strip() or not file_id.strip():
            raise _refuse(f"--facade {pair!r}: expected MODEL=FILE, e.g. --facade north=street")
        mapping[model_id.strip()] = file_id.strip()
    return mapping


def _with_ground(building: Building, kind: str) -> Building:
    """``building`` with the ground the user named at the import, under every facade."""
    import dataclasses

    from petfall_audit.model import Surface, SurfaceKind

    ground = Surface(id="ground", kind=SurfaceKind(kind), elevation_m=0.0,
                     label=f"Ground ({kind.replace('_', ' ')}), given at the import: check it")
    return dataclasses.replace(building, surfaces=(*building.surfaces, ground))


def _cmd_import_model(args: argparse.Namespace) -> int:
    """``import MODEL.ifc --into FILE``: create FILE from the model, or merge into it."""
    from petfall_audit.cautions import CAUTIONS_SHORT
    from petfall_audit.io.building_file import save_building, validate_building
    from petfall_audit.io.ifc_import import apply_model, new_building, preview_model, read_model
    from petfall_audit.io.survey import survey_warnings

    facade_map = _facade_map(args.facade or ())
    into = Path(args.into)
    creating = not into.exists()
    if creating:
        _check_output(into)
    building = None if creating else _load(args.into)
    model = read_model(Path(args.schedule), progress=_stderr_progress("reading the model"))
    unknown = sorted(set(facade_map) - {f.id for f in model.facades})
    if unknown:
        raise _refuse(f"--facade: the model has no facade {', '.join(map(repr, unknown))} "
                      f"(it has {', '.join(f.id for f in model.facades) or 'none'})")
    from petfall_audit.present import fmt_survey_length

    _say(model.summary())
    for storey in model.storeys:
        _say(f"  storey level {storey.level}: {storey.label!r} at "
             f"{fmt_survey_length(storey.elevation_m)}")
    for facade in model.facades:
        _say(f"  facade {facade.id}: {facade.label}, {fmt_survey_length(facade.length_m)}")
    for note in model.assumptions:
        _say(f"  assumed: {note}")
    for note in model.skipped:
        _say(f"  left out: {note}")
    if creating:
        if facade_map:
            raise _refuse("--facade applies when merging into an existing building file")
        updated, preview = new_building(model)
        if args.ground:
            updated = _with_ground(updated, args.ground)
    elif args.ground:
        raise _refuse("--ground applies when the import creates the building file; add "
                      "surfaces to an existing one in the app or the file")
    else:
        assert building is not None
        preview = preview_model(model, building, facade_map=facade_map)
    if preview.problems:
        _say(f"{args.schedule}: {_count(preview.problems, 'problem')} (row n is the model's "
              "opening n - 1 in the list above):", file=sys.stderr)
        for problem in preview.problems:
            _say(f"  {problem}", file=sys.stderr)
        if not args.accept_valid or not preview.openings:
            _say(f"{args.schedule}: nothing imported; fix the model, or import the "
                  f"{_count(preview.openings, 'valid opening')} with --accept-valid",
                  file=sys.stderr)
            return EXIT_INVALID
    if not preview.openings:
        _say(f"{args.schedule}: the model holds no window or balcony to import; nothing "
              "written", file=sys.stderr)
        return EXIT_INVALID
    if not creating:
        assert building is not None
        updated = apply_model(building, model, preview, mode=args.mode,
                              accept_valid_rows=args.accept_valid, facade_map=facade_map)
        after = validate_building(updated)
        if after:  # never turn a building file that loads into one that does not
            _say(f"{args.into}: the imported building would have {_count(after, 'problem')}:",
                  file=sys.stderr)
            for building_problem in after:
                _say(f"  {building_problem}", file=sys.stderr)
            _say(f"{args.into}: nothing imported", file=sys.stderr)
            return EXIT_INVALID
    save_building(updated, into)
    verb = "created" if creating else f"updated ({args.mode})"
    _say(f"{args.schedule} -> {args.into} {verb}: {preview.summary()}")
    _say(f"{args.into}: {_count(updated.floors, 'floor')}, "
          f"{_count(updated.facades, 'facade')}, {_count(updated.openings, 'opening')}")
    missing = validate_building(updated)
    if missing:
        _say(f"{args.into}: not ready to assess yet, {_count(missing, 'problem')} (the model "
              "does not hold what lies below each facade: add the surfaces, or import again "
              f"into a new file with --ground KIND), then run petfall-audit check {args.into}")
        for building_problem in missing:
            _say(f"  {building_problem}")
    warnings = survey_warnings(updated)
    if warnings:
        _say(f"{args.into}: {_count(warnings, 'opening')} still to survey (guards, limiters, "
              "screens, netting, how often opened, cats); petfall-audit check lists them")
    _say(CAUTIONS_SHORT)
    return EXIT_OK


def _cmd_template(args: argparse.Namespace) -> int:
    from petfall_audit.io.template import template_headers, write_template

    _check_output(args.out)
    _keep_edited(args.out, args.force, "a filled-in schedule")
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
    from petfall_audit.model import SurfaceKind

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
    p.add_argument("--by", choices=("band", "risk"), default="risk",
                   help="table order: risk score (default; the order of the PDF, the app and "
                        "the exports) or expected injury band")
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
    p.add_argument("--budget", type=_amount, default=None, metavar="AMOUNT",
                   help="budget in the control catalogue's currency (default: the budget "
                        "saved with the audit)")
    _add_table_output_options(p)
    _add_sampling_options(p)
    p.add_argument("--controls", default=None, metavar="FILE",
                   help="control catalogue (.json; default: the shipped catalogue)")
    p.add_argument("--write-after", default=None, metavar="AFTER.json",
                   help="also write a copy of the building with the plan's fixes fitted (a "
                        "what-if; FILE is left as it is), e.g. to compare FILE AFTER.json")
    p.set_defaults(handler=_cmd_plan)

    p = sub.add_parser(
        "compare",
        help="compare an earlier audit of a building with a later one, opening by opening",
        description="Assess EARLIER and LATER with the same sampled cats and list what changed: "
        "openings added, removed or changed (which fields, old and new), their results before "
        "and after, and the share of the risk removed by the fixes fitted since and by other "
        "changes. Indicative model only.",
    )
    p.add_argument("earlier", metavar="EARLIER", help="the earlier building file (.json)")
    p.add_argument("later", metavar="LATER", help="the later building file (.json)")
    _add_table_output_options(p)
    _add_sampling_options(p)
    p.add_argument("--rename", action="append", metavar="OLD=NEW",
                   help="pair the earlier opening OLD with the later opening NEW (an opening "
                        "renumbered between the audits; repeatable)")
    p.set_defaults(handler=_cmd_compare)

    p = sub.add_parser(
        "fixes",
        help="record what became of each recommended fix; start the next audit with the "
             "fitted ones",
        description="List the fixes recorded in FILE; record the plan's fixes as recommended "
        "(--record-plan); set one fix's status (--set); or write the building as the next "
        "audit starts, every fitted or checked fix written into its opening (--apply-fitted "
        "-o NEXT.json).",
    )
    p.add_argument("file", help="building file (.json); --record-plan and --set update it "
                                "(or write to -o)")
    p.add_argument("--record-plan", action="store_true",
                   help="record every fix of the plan (saved budget or --budget) as recommended")
    p.add_argument("--budget", type=_amount, default=None, metavar="AMOUNT",
                   help="with --record-plan: the budget (default: the one saved)")
    p.add_argument("--set", nargs=3, metavar=("OPENING", "CONTROL", "STATUS"),
                   help="set the status of CONTROL on OPENING: recommended, approved, fitted, "
                        "checked or declined")
    p.add_argument("--date", default=None, metavar="YYYY-MM-DD",
                   help="date of the status (with --apply-fitted: the next audit's date)")
    p.add_argument("--note", default=None, metavar="TEXT", help="with --set: a note")
    p.add_argument("--apply-fitted", action="store_true",
                   help="write the building with its fitted fixes as barriers to -o")
    p.add_argument("-o", "--output", default=None, metavar="OUT.json",
                   help="with --apply-fitted: the next audit's building file to write; with "
                        "--record-plan or --set alone: write the updated file there and "
                        "leave FILE as it is")
    p.add_argument("--controls", default=None, metavar="FILE",
                   help="control catalogue (.json; default: the shipped catalogue)")
    p.add_argument("--force", action="store_true",
                   help="with --apply-fitted: replace OUT.json if it exists")
    _add_sampling_options(p)
    p.set_defaults(handler=_cmd_fixes)

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
    p.add_argument("--budget", type=_amount, default=None, metavar="AMOUNT",
                   help="budget for the fix plan, in the control catalogue's currency "
                        "(default: the budget saved with the audit; none: no plan)")
    p.add_argument("--leaflet", default=None, metavar="PDF", help="also write a tenant leaflet")
    p.add_argument("--leaflet-omit", action="append", default=None, metavar="SECTIONS",
                   help="leave these leaflet sections out (comma-separated, repeatable): why, "
                   "checks, building, after_fall, contact, or measures for the plan's measures")
    p.add_argument("--leaflet-text", default=None, metavar="TEXT",
                   help="the leaflet's sections as edited text (start from the output of "
                   "'petfall-audit leaflet-text FILE')")
    p.add_argument("--contact", default=None, metavar="TEXT",
                   help="issuer's contact block: first line the organisation; separate lines "
                   "with '|' or a newline")
    _add_sampling_options(p)
    p.add_argument("--top", type=int, default=5, metavar="N",
                   help="openings with a detail page (default 5)")
    p.add_argument("--earlier", default=None, metavar="OLD.json",
                   help="an earlier audit of the building: adds the section \"Since the "
                        "earlier audit\" (assessed with the same samples and seed)")
    p.add_argument("--rename", action="append", metavar="OLD=NEW",
                   help="with --earlier: pair the earlier opening OLD with the later opening "
                        "NEW (repeatable)")
    p.add_argument("--what-if", action="store_true",
                   help="add the section \"After the plan (what-if)\": the building with the "
                        "plan's fixes fitted, opening by opening")
    p.set_defaults(handler=_cmd_report)

    p = sub.add_parser(
        "leaflet-text",
        help="write the tenant leaflet's sections as text to edit",
        description="Write the sections of FILE's tenant leaflet, in the words of its code "
        "profile, as plain text: a line '[key] Title' starts a section, each further line is a "
        "paragraph or bullet. Edit it, delete the sections you do not want, and pass it to "
        "'report --leaflet-text'.",
    )
    p.add_argument("file", help="building file (.json)")
    p.add_argument("-o", "--output", default=None, help="text file to write (default: stdout)")
    p.add_argument("--force", action="store_true",
                   help="replace the text file if it exists (its edits would be lost)")
    p.set_defaults(handler=_cmd_leaflet_text)

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
    p.add_argument("--budget", type=_amount, default=None, metavar="AMOUNT",
                   help="also plan fixes within AMOUNT per building")
    p.add_argument("--portfolio-budget", type=_amount, default=None, metavar="AMOUNT",
                   help="also plan one budget of AMOUNT over every opening of every building: "
                        "writes DIR/portfolio-plan.json and the estate summary DIR/portfolio.pdf")
    p.add_argument("--jobs", type=int, default=None, metavar="N",
                   help="buildings assessed at once, in separate processes, one core each "
                        "(default: the number of cores, fewer if memory is short)")
    _add_sampling_options(p)
    p.set_defaults(handler=_cmd_batch)

    p = sub.add_parser(
        "import",
        help="import floors and openings from a schedule (.csv or .xlsx) or a building model "
             "(.ifc)",
        description="Import floors and openings into FILE. From a schedule, FILE must exist. "
        "From a building model (.ifc, needs the optional ifcopenshell package), FILE is "
        "created when it does not exist, else the model is merged into it.",
    )
    p.add_argument("schedule", metavar="SOURCE",
                   help="schedule spreadsheet (.csv or .xlsx) or building model (.ifc)")
    p.add_argument("--into", required=True, metavar="FILE",
                   help="building file to update (a model creates it when missing)")
    p.add_argument("--ground", default=None, metavar="KIND",
                   choices=[kind.value for kind in SurfaceKind],
                   help="model only, when creating FILE: what the ground below every facade is "
                        "(the model does not say); without it FILE has no surface yet")
    p.add_argument("--facade", action="append", metavar="MODEL=FILE",
                   help="model only: put the model's facade MODEL on the file's facade FILE "
                        "(repeatable)")
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
    p.add_argument("--force", action="store_true",
                   help="replace OUT if it exists (a filled-in schedule would be lost)")
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
    if args.handler is _cmd_open:
        return _run(args)
    with _library_chatter_held() as held, few_collections():
        try:
            code = _run(args)
        except BaseException:  # an unexpected error: its traceback follows on stderr
            _show_held(held)
            raise
        if code != EXIT_OK:
            _show_held(held)
        return code


def run() -> NoReturn:
    """The ``petfall-audit`` program: :func:`main` on ``sys.argv``, then exit with its code.
    The objects left at exit are frozen out of the collector first: the interpreter's last
    collection would only walk them before the process ends."""
    code = main()
    freeze_survivors()
    raise SystemExit(code)


def _run(args: argparse.Namespace) -> int:
    """The subcommand's exit code; failures reported on stderr in plain words."""
    try:
        return int(args.handler(args))
    except _Stop as stop:
        return stop.code
    except PetfallError as exc:
        _say(f"petfall-audit: {exc}", file=sys.stderr)
        return EXIT_INVALID
    except BrokenPipeError:
        # the reader of the output went away (``| head``): stop quietly, as a pipeline expects
        for stream in (sys.stdout, sys.stderr):
            _flush_or_drop(stream)
        return EXIT_FAILURE
    except OSError as exc:
        where = f"{exc.filename}: " if exc.filename else ""
        _say(f"petfall-audit: {where}{exc.strerror or exc}", file=sys.stderr)
        return EXIT_FAILURE
    except KeyboardInterrupt:
        _say("\npetfall-audit: interrupted; no output was left half-written", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    run()
