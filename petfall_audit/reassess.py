"""Reassessing a building after an edit: only the openings whose falls can have changed.

An edit changes the falls of few openings: the edited ones, and those whose fall can land on an
edited element (a balcony or a surface below them). :class:`Reassessor` remembers, for the last
building it assessed, each opening's fall summary under the opening's *fall signature*: its
candidate landing elements with their ids, kinds, drops, spans and distances, exact to the bit
(:meth:`petfall_audit._interception.FallGeometry.signatures`). The next building reuses the
summary of every opening whose signature it knows and simulates only the others, with the same
cats (common random numbers); openings of one building with equal signatures are simulated
once. The cat profile, the site's air density and the injury thresholds enter every fall, so
when one of them changes everything is recomputed. The likelihood of an opening depends on the
opening and the cat profile alone and is reused for every unchanged opening.

The result equals :func:`petfall_audit.risk.assess` of the same building, samples and seed,
array for array (tests check it on random edits).
"""

from __future__ import annotations

import threading
from collections.abc import Callable, Hashable
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from petfall_audit._interception import FallGeometry, fall_geometry, simulate_chunks
from petfall_audit._physics_results import FALL_ARRAYS
from petfall_audit.injury import DEFAULT_STOPS, InjuryThresholds, StoppingDistances
from petfall_audit.likelihood import (
    OpeningLikelihood,
    likelihood_key,
    likelihood_of_rows,
    opening_likelihood,
)
from petfall_audit.model import Building, CatProfile, Opening, SurfaceKind
from petfall_audit.physics import FallResults, air_density
from petfall_audit.risk import (
    KEEP_FALLS_MAX,
    MAX_SAMPLES,
    Assessment,
    OpeningResult,
    _assessment,
    _Summary,
    severity_of_falls,
)
from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED, CatSamples, sample_cat_profile

__all__ = ["Reassessor", "assess_deduplicated"]

_SUMMARY_ARRAYS = ("probs", "mean_sev", "drop_pct", "speed_pct", "water_share",
                   "unrighted_share")
#: The per-fall arrays but the landing (whose indices move with the landing elements' order).
_FALL_ARRAYS = tuple(name for name in FALL_ARRAYS if name != "landing")


@dataclass(slots=True)
class _Memory:
    """What the last assessment leaves for the next: the summaries by row, the row of each
    signature, and (when kept) every fall and its dose."""

    key: tuple[CatProfile, float, InjuryThresholds]
    summary: _Summary
    row_of: dict[Hashable, int]
    landing_ids: tuple[str, ...]
    falls: FallResults | None
    severity_g: npt.NDArray[np.float64] | None


class Reassessor:
    """Assessments of successive versions of a building with ``samples`` cats drawn with
    ``seed``, each equal to :func:`petfall_audit.risk.assess` of that version, recomputing only
    what changed since the previous call (see the module docstring).

    ``keep_falls`` as in :func:`~petfall_audit.risk.assess` (default: keep no falls, which
    needs no copy of the ``(openings, samples)`` arrays per edit). One call at a time
    (a lock); ``last_simulated``: openings simulated by the last call.
    """

    def __init__(self, *, samples: int = DEFAULT_SAMPLES, seed: int = DEFAULT_SEED,
                 stops: StoppingDistances = DEFAULT_STOPS, keep_falls: bool | None = False) -> None:
        if samples < 1:
            raise ValueError(f"samples must be at least 1, got {samples}")
        if samples > MAX_SAMPLES:
            raise ValueError(f"samples must be at most {MAX_SAMPLES:,}, got {samples}")
        self.samples = int(samples)
        self.seed = int(seed)
        self.stops = stops
        self.keep_falls = keep_falls
        self.last_simulated = 0
        self._lock = threading.Lock()
        self._memory: _Memory | None = None
        self._cat: tuple[CatProfile, CatSamples] | None = None
        self._geometry: tuple[Building, FallGeometry, list[Hashable]] | None = None
        self._likelihood: dict[int, tuple[Opening, CatProfile, OpeningLikelihood]] = {}
        #: the last results by opening (held, so that its id stays its own)
        self._results: dict[int, tuple[Opening, OpeningResult]] = {}

    @property
    def remembers(self) -> bool:
        """True once an assessment left its work for the next one."""
        return self._memory is not None

    def forget(self) -> None:
        """Drop what the previous assessments left (the next call computes everything)."""
        with self._lock:
            self._memory = None
            self._geometry = None
            self._likelihood = {}
            self._results = {}

    def to_simulate(self, building: Building) -> int:
        """How many openings :meth:`assess` of ``building`` would simulate now (the geometry
        step only, kept for that call)."""
        with self._lock:
            _, sigs = self._geometry_of(building)
            memory = self._usable_memory(building, self._keep(building))
            known = memory.row_of if memory is not None else {}
            return len({s for s in sigs if s not in known})

    def assess(self, building: Building, *,
               progress: Callable[[int, int], None] | None = None) -> Assessment:
        """The assessment of ``building``; ``progress(done, total)`` counts the openings
        simulated (it may raise to stop the call, which then changes nothing)."""
        with self._lock:
            return self._assess(building, progress)

    # --- inside the lock ----------------------------------------------------------------------

    def _keep(self, building: Building) -> bool:
        n = len(building.openings) * self.samples
        return n <= KEEP_FALLS_MAX if self.keep_falls is None else bool(self.keep_falls)

    def _key(self, building: Building) -> tuple[CatProfile, float, InjuryThresholds]:
        rho = float(air_density(building.info.site_altitude_m, building.info.air_temperature_c))
        return building.cat_profile, rho, building.injury

    def _usable_memory(self, building: Building, keep: bool) -> _Memory | None:
        m = self._memory
        if m is None or m.key != self._key(building) or (keep and m.falls is None):
            return None
        return m

    def _geometry_of(self, building: Building) -> tuple[FallGeometry, list[Hashable]]:
        g = self._geometry
        if g is not None and g[0] is building:
            return g[1], g[2]
        geo = fall_geometry(building)
        sigs: list[Hashable] = list(geo.signatures())
        self._geometry = (building, geo, sigs)
        return geo, sigs

    def _cat_of(self, profile: CatProfile) -> CatSamples:
        c = self._cat
        if c is not None and (c[0] is profile or c[0] == profile):
            return c[1]
        cat = sample_cat_profile(profile, self.samples, seed=self.seed)
        self._cat = (profile, cat)
        return cat

    def _likelihood_of(self, building: Building) -> list[OpeningLikelihood]:
        profile = building.cat_profile
        old = self._likelihood
        new: dict[int, tuple[Opening, CatProfile, OpeningLikelihood]] = {}
        by_key: dict[Hashable, OpeningLikelihood] = {}  # the openings of a building repeat
        rows = []
        for o in building.openings:
            hit = old.get(id(o))
            if hit is not None and hit[0] is o and (hit[1] is profile or hit[1] == profile):
                row = hit[2]
            else:
                key = likelihood_key(o)
                known = by_key.get(key)
                row = known if known is not None else by_key.setdefault(
                    key, opening_likelihood(o, profile))
            new[id(o)] = (o, profile, row)  # the opening is held, so its id stays its own
            rows.append(row)
        self._likelihood = new
        return rows

    def _assess(self, building: Building,
                progress: Callable[[int, int], None] | None) -> Assessment:
        n, samples = len(building.openings), self.samples
        keep = self._keep(building)
        cat = self._cat_of(building.cat_profile)
        key = self._key(building)
        rho, thresholds = key[1], key[2]
        geo, sigs = self._geometry_of(building)
        memory = self._usable_memory(building, keep)
        known = memory.row_of if memory is not None else {}

        src = np.full(n, -1, dtype=np.intp)  # row in the memory, or -1
        fresh_of = np.zeros(n, dtype=np.intp)  # row among the simulated ones
        first: dict[Hashable, int] = {}
        need: list[int] = []
        for i, sig in enumerate(sigs):
            j = known.get(sig)
            if j is not None:
                src[i] = j
                continue
            k = first.get(sig)
            if k is None:
                k = first[sig] = len(need)
                need.append(i)
            fresh_of[i] = k

        part = _Summary(len(need), samples)
        doses: dict[int, npt.NDArray[np.float64]] = {}

        def summarise(a: int, b: int, falls: FallResults) -> None:  # on the block's thread
            sev = severity_of_falls(falls, cat, self.stops)
            part.add(a, b, falls, sev, thresholds)
            if keep:
                doses[a] = sev

        parts: list[tuple[FallResults, npt.NDArray[np.float64]]] = []
        for a, _, falls in simulate_chunks(building, cat, rho_kg_m3=rho, progress=progress,
                                           geometry=geo, rows=np.asarray(need, dtype=np.intp),
                                           then=summarise):
            if keep:
                parts.append((falls, doses.pop(a)))
        lik = likelihood_of_rows(self._likelihood_of(building))

        reuse = np.flatnonzero(src >= 0)
        fresh = np.flatnonzero(src < 0)
        summary = _Summary(n, samples)
        for name in _SUMMARY_ARRAYS:
            out = getattr(summary, name)
            if memory is not None and reuse.size:
                out[reuse] = getattr(memory.summary, name)[src[reuse]]
            if fresh.size:
                out[fresh] = getattr(part, name)[fresh_of[fresh]]
        for i in range(n):
            j = int(src[i])
            if j >= 0:
                assert memory is not None
                summary.landing[i] = memory.summary.landing[j]
                summary.landing_kind[i] = memory.summary.landing_kind[j]
            else:
                k = int(fresh_of[i])
                summary.landing[i] = part.landing[k]
                summary.landing_kind[i] = part.landing_kind[k]

        falls_all, sev_all = (self._joined(building, geo, memory, parts, src, fresh_of, rho)
                              if keep else (None, None))
        row_of: dict[Hashable, int] = {}
        for i, sig in enumerate(sigs):
            row_of.setdefault(sig, i)
        old_results = self._results if memory is not None else {}
        openings = building.openings

        def previous(i: int) -> OpeningResult | None:
            # the same opening, its falls known (equal summary) and the same key: equal result
            if src[i] < 0:
                return None
            hit = old_results.get(id(openings[i]))
            return hit[1] if hit is not None and hit[0] is openings[i] else None

        result = _assessment(building, cat, summary, samples=samples, seed=self.seed,
                             thresholds=thresholds, stops=self.stops, rho_kg_m3=rho,
                             falls=falls_all, severity_g=sev_all, likelihood=lik,
                             previous=previous)
        self._memory = _Memory(key, summary, row_of, geo.landing_ids, falls_all, sev_all)
        self._results = {id(o): (o, r) for o, r in zip(openings, result.openings, strict=True)}
        self.last_simulated = len(need)
        return result

    def _joined(
        self, building: Building, geo: FallGeometry, memory: _Memory | None,
        parts: list[tuple[FallResults, npt.NDArray[np.float64]]],
        src: npt.NDArray[np.intp], fresh_of: npt.NDArray[np.intp], rho: float,
    ) -> tuple[FallResults, npt.NDArray[np.float64]]:
        """Every fall and dose of ``building``: the remembered rows (their landing indices
        moved to the new element order) and the simulated ones."""
        n, s = len(building.openings), self.samples
        reuse = np.flatnonzero(src >= 0)
        fresh = np.flatnonzero(src < 0)
        arrays: dict[str, npt.NDArray[np.generic]] = {}
        for name in _FALL_ARRAYS:
            out = np.empty((n, s), dtype=bool if name == "righted" else float)
            if memory is not None and memory.falls is not None and reuse.size:
                out[reuse] = getattr(memory.falls, name)[src[reuse]]
            if fresh.size:
                out[fresh] = np.concatenate([getattr(p[0], name) for p in parts])[
                    fresh_of[fresh]]
            arrays[name] = out
        landing = np.empty((n, s), dtype=np.intp)
        sev = np.empty((n, s))
        if memory is not None and memory.falls is not None and reuse.size:
            index = {e: k for k, e in enumerate(geo.landing_ids)}
            moved = np.array([index.get(e, -1) for e in memory.landing_ids], dtype=np.intp)
            landing[reuse] = moved[memory.falls.landing[src[reuse]]]
            assert memory.severity_g is not None
            sev[reuse] = memory.severity_g[src[reuse]]
        if fresh.size:
            landing[fresh] = np.concatenate([p[0].landing for p in parts])[fresh_of[fresh]]
            sev[fresh] = np.concatenate([p[1] for p in parts])[fresh_of[fresh]]
        kinds: tuple[SurfaceKind, ...] = geo.landing_kinds
        falls = FallResults(
            opening_ids=tuple(o.id for o in building.openings),
            landing_ids=geo.landing_ids,
            landing_kinds=kinds,
            drop_m=arrays["drop_m"],  # type: ignore[arg-type]
            landing=landing,
            impact_speed_mps=arrays["impact_speed_mps"],  # type: ignore[arg-type]
            fall_time_s=arrays["fall_time_s"],  # type: ignore[arg-type]
            righted=arrays["righted"],  # type: ignore[arg-type]
            rho_kg_m3=rho,
        )
        return falls, sev


def assess_deduplicated(building: Building, *, samples: int = DEFAULT_SAMPLES,
                        seed: int = DEFAULT_SEED,
                        progress: Callable[[int, int], None] | None = None) -> Assessment:
    """:func:`petfall_audit.risk.assess` of ``building`` without kept falls, equal to it array
    for array, simulating each distinct fall signature once (the openings of a tower repeat:
    the same drops onto the same elements). ``progress`` counts the openings simulated."""
    return Reassessor(samples=samples, seed=seed).assess(building, progress=progress)
