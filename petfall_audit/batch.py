"""Assess many buildings, one after another or in parallel processes (the ``batch`` command).

Each building is one :class:`BatchJob`; :func:`run_one` loads, assesses (and plans) it and
writes its result file under a temporary name in the output folder; :func:`run_all` runs the
jobs in ``jobs`` worker processes and returns the outcomes in input order, so the results do
not depend on how many processes ran them. A building that fails is reported in plain words
and skipped; the others go on. The caller gives each result its final name.
"""

from __future__ import annotations

import math
import os
from collections.abc import Callable, Sequence
from concurrent.futures import Future, ProcessPoolExecutor, as_completed
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

from petfall_audit._collector import set_up_worker
from petfall_audit.band_names import BANDS

if TYPE_CHECKING:
    from petfall_audit.errors import PetfallError
    from petfall_audit.fixes import Option
    from petfall_audit.model import Building

__all__ = ["BatchJob", "BuildingOutcome", "SUMMARY_COLUMNS", "default_jobs", "describe_problems",
           "run_one", "run_all", "discard"]


@dataclass(frozen=True, slots=True)
class BatchJob:
    """One building of a batch: ``path`` its file, results of format ``fmt`` ("json", "csv" or
    "pdf") go to ``out_dir``; ``budget`` (catalogue currency) plans it alone; ``want_options``
    returns its fix options (for a plan over several buildings)."""

    index: int
    path: str
    out_dir: str
    fmt: str
    samples: int
    seed: int
    budget: float | None = None
    want_options: bool = False


@dataclass(frozen=True, slots=True)
class BuildingOutcome:
    """What one job produced. ``error``: why it failed, in plain words (``None`` on success);
    ``result_tmp``: the temporary file holding the result; ``band_counts``: openings per
    expected band, mildest first; ``risk_total``: summed risk score; ``plan_cost`` and
    ``plan_risk_after``: its own plan (``None`` without a budget); ``options``: per opening id
    its fix options (when asked for), ``currency`` theirs."""

    index: int
    path: str
    error: str | None = None
    building_name: str = ""
    n_openings: int = 0
    band_counts: tuple[int, ...] = ()
    worst_id: str = ""
    risk_total: float = 0.0
    plan_cost: float | None = None
    plan_risk_after: float | None = None
    result_tmp: str = ""
    options: dict[str, list[Option]] | None = field(default=None)
    currency: str = ""

    def summary_row(self, result_file: str) -> list[object]:
        """This building's line of the batch's ``summary.csv`` (:data:`SUMMARY_COLUMNS`):
        risk and costs to the whole unit, empty cells where there is no plan."""
        def whole(x: float | None) -> object:
            return "" if x is None else int(math.floor(x + 0.5))

        return [self.path, self.building_name, self.n_openings, *self.band_counts,
                self.worst_id, whole(self.risk_total), whole(self.plan_cost),
                whole(self.plan_risk_after), result_file]


#: The columns of a batch's ``summary.csv``, one row per building assessed.
SUMMARY_COLUMNS: tuple[str, ...] = (
    "file", "building", "openings", *(f"expected_{b}" for b in BANDS), "highest_risk_opening",
    "risk_total", "plan_cost", "risk_after_plan", "result_file")


#: Memory one worker may need at most (bytes): an assessment that keeps its falls (about 0.2 GB,
#: see :data:`petfall_audit.risk.KEEP_FALLS_MAX`) with its report and temporaries.
WORKER_MEMORY_BYTES = 1_500_000_000


def default_jobs() -> int:
    """The number of cores this process may use, but no more workers than the machine's memory
    holds at :data:`WORKER_MEMORY_BYTES` each (at least 1)."""
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # not on every platform
        cores = os.cpu_count() or 1
    try:
        memory = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (AttributeError, ValueError, OSError):  # not on every platform
        memory = 0
    fit = memory // WORKER_MEMORY_BYTES if memory > 0 else cores
    return max(1, min(cores, fit))


def describe_problems(exc: PetfallError, path: str) -> str:
    """The problems of a file that could not be used, one a line, for stderr."""
    from petfall_audit.errors import CatalogueError, ValidationFailed

    problems = getattr(exc, "problems", None)
    if isinstance(exc, ValidationFailed | CatalogueError) and problems:
        from petfall_audit.present.numbers import fmt_count

        return "\n".join([f"{path}: {fmt_count(len(problems), 'problem')}:",
                          *(f"  {problem}" for problem in problems)])
    return f"{path}: {exc}"


def _too_many_samples(samples: int, n_open: int) -> str | None:
    """Why ``samples`` cannot be assessed, or ``None``: only the number of sampled cats is
    limited (a building of any size is summarised block by block)."""
    from petfall_audit.risk import MAX_SAMPLES

    if samples <= MAX_SAMPLES:
        return None
    return f"--samples {samples} is too many: at most {MAX_SAMPLES:,} simulated cats per opening"


def run_one(job: BatchJob) -> BuildingOutcome:
    """Load, assess and (with a budget) plan one building; write its result file under a
    temporary name in ``job.out_dir``. Never raises for a problem of the building: the outcome
    says what went wrong."""
    from petfall_audit.errors import BuildingFileError, PetfallError

    written: list[str] = []
    try:
        from petfall_audit.io.building_file import load_building

        try:
            building = load_building(Path(job.path))
        except BuildingFileError as exc:
            return BuildingOutcome(job.index, job.path, error=describe_problems(exc, job.path))
        too_many = _too_many_samples(job.samples, len(building.openings))
        if too_many:
            return BuildingOutcome(job.index, job.path, error=f"{job.path}: {too_many}")
        from petfall_audit._threads import one_thread

        with one_thread():  # one core per building: --jobs shares out the cores
            return _assess_and_write(job, building, written)
    except PetfallError as exc:
        error = f"{job.path}: {exc}"
    except (ValueError, OSError, MemoryError) as exc:
        error = f"{job.path}: could not be assessed: {exc}"
    except Exception as exc:  # a fault of ours: report it and let the other buildings go on
        error = f"{job.path}: could not be assessed ({type(exc).__name__}: {exc})"
    for path in written:
        discard(path)
    return BuildingOutcome(job.index, job.path, error=error)


def _assess_and_write(job: BatchJob, building: Building, written: list[str]) -> BuildingOutcome:
    """The work of :func:`run_one` once the building is loaded; the temporary result file is
    added to ``written`` as soon as it exists."""
    import tempfile

    from petfall_audit.fixes import load_catalogue, opening_options
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.results_envelope import results_json_text
    from petfall_audit.io.results_export import assessment_to_csv
    from petfall_audit.plan import make_plan
    from petfall_audit.reassess import assess_deduplicated

    # risk.assess exactly; no result needs every fall (keeping them would only copy arrays)
    assessment = assess_deduplicated(building, samples=job.samples, seed=job.seed)
    catalogue = load_catalogue() if job.budget is not None or job.want_options else None
    options = opening_options(assessment, catalogue) if catalogue is not None else None
    plan = (make_plan(assessment, job.budget, catalogue=catalogue, options=options)
            if job.budget is not None else None)
    fd, tmp = tempfile.mkstemp(dir=job.out_dir, prefix=".partial-", suffix=f".{job.fmt}")
    os.close(fd)
    written.append(tmp)
    if job.fmt == "json":
        atomic_write_text(tmp, results_json_text(assessment=assessment, plan=plan))
    elif job.fmt == "csv":
        atomic_write_text(tmp, assessment_to_csv(assessment))
    else:
        from petfall_audit.report import write_audit

        write_audit(assessment, plan, tmp, photo_root=Path(job.path).parent)
    worst = assessment.ranked()[0] if assessment.openings else None
    return BuildingOutcome(
        index=job.index,
        path=job.path,
        building_name=building.info.name,
        n_openings=len(building.openings),
        band_counts=assessment.band_counts(),
        worst_id=worst.id if worst else "",
        risk_total=float(assessment.risk.sum()),
        plan_cost=plan.total_cost if plan else None,
        plan_risk_after=plan.risk_after if plan else None,
        result_tmp=tmp,
        options=options if job.want_options else None,
        currency=catalogue.currency if catalogue is not None else "",
    )


def discard(path: str) -> None:
    """Remove a temporary result file if it is still there."""
    if path:
        try:
            os.remove(path)
        except FileNotFoundError:
            pass


def run_all(
    jobs: Sequence[BatchJob],
    *,
    workers: int = 1,
    progress: Callable[[int, int], None] | None = None,
) -> list[BuildingOutcome]:
    """Every job's outcome, in the order of ``jobs``. ``workers`` > 1 runs them in that many
    processes (fresh interpreters, the same on every platform); ``progress(done, total)`` is
    called as buildings finish. On an interruption, the temporary files written so far are
    removed."""
    total = len(jobs)
    outcomes: dict[int, BuildingOutcome] = {}
    if progress is not None:
        progress(0, total)
    try:
        if workers <= 1 or total <= 1:
            for job in jobs:
                outcomes[job.index] = run_one(job)
                if progress is not None:
                    progress(len(outcomes), total)
        else:
            _run_parallel(jobs, min(workers, total), outcomes, progress)
    except BaseException:
        for outcome in outcomes.values():
            discard(outcome.result_tmp)
        raise
    return [outcomes[job.index] for job in jobs]


def _run_parallel(jobs: Sequence[BatchJob], workers: int, outcomes: dict[int, BuildingOutcome],
                  progress: Callable[[int, int], None] | None) -> None:
    import multiprocessing

    context = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, mp_context=context,
                             initializer=set_up_worker) as pool:
        futures: dict[Future[BuildingOutcome], BatchJob] = {
            pool.submit(run_one, job): job for job in jobs
        }
        try:
            for future in as_completed(futures):
                job = futures[future]
                try:
                    outcomes[job.index] = future.result()
                except Exception as exc:  # the worker process itself stopped
                    outcomes[job.index] = BuildingOutcome(
                        job.index, job.path,
                        error=f"{job.path}: could not be assessed: the worker process stopped "
                              f"({type(exc).__name__}: {exc})")
                if progress is not None:
                    progress(len(outcomes), len(jobs))
        except BaseException:
            pool.shutdown(wait=True, cancel_futures=True)
            for future in futures:
                if future.done() and not future.cancelled() and future.exception() is None:
                    discard(future.result().result_tmp)
            raise
