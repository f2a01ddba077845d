"""Which element below catches each falling cat, and the fall to it (private; SI units).

Method, for every opening at once:

1. Geometry, without samples: the candidate elements of each opening (same facade or every
   facade, below the start height, overlapping the opening's width, reaching further out than
   the launch point), highest first. A candidate is dropped when a higher one covers the whole
   width of the opening, is reachable from the launch point and reaches at least as far out:
   outward travel only grows with the drop, so whatever passes the higher one passes this one
   too (e.g. stacked balconies below a window). The implicit ground closes every list.
   A surface covers its outward extent and, when it has one, its extent along the facade
   (``x_from_m`` to ``x_to_m``); a balcony covers its width and projection.
2. Per sampled cat, the drop at which its outward travel reaches each distinct distance that
   matters (an element's outer or inner edge minus the launch offset): a small table from the
   exact inverse of the outward-travel formula.
3. Per opening × cat × candidate, the candidate catches when the cat's position along the facade
   lies in its span and the drop to its *test level* lies between the thresholds of step 2; the
   first (highest) catching candidate is the landing element. The test level is the element's
   own elevation, except for a sunken surface (below the datum: a lightwell, a basement area),
   whose rim is at the datum: a cat over its footprint when it passes the rim falls into it,
   whatever its outward travel further down (it meets the well's outer wall). Then the
   closed-form two-posture fall over the drop to the element itself gives the impact speed
   (downward and outward parts together) and the fall time.

The opening axis is processed in chunks to bound memory; nothing loops over samples.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from petfall_audit import _physics_kernels as _k
from petfall_audit._physics_kernels import G0
from petfall_audit._physics_results import GROUND_ID, FallResults
from petfall_audit._threads import in_order_ahead
from petfall_audit.model import BALCONY_LIKE, Building, SurfaceKind
from petfall_audit.sampling import CatSamples

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.intp]

#: Elements per (chunk of openings × samples) array: about 2 MB of float64, cache-friendly.
_CHUNK_ELEMENTS = 1 << 18
#: Openings per chunk of the geometry step (openings × elements matrices).
_GEOMETRY_CHUNK = 512


@dataclass(frozen=True, slots=True)
class _Pairs:
    """Candidate (opening, element) pairs, grouped by opening, highest element first."""

    start: IntArray  # (n_openings + 1,) offsets of each opening's pairs
    element: IntArray  # index into landing_ids
    drop_m: FloatArray  # to the element's own elevation (the fall)
    test_drop_m: FloatArray  # to its test level (the rim of a sunken surface)
    frac_lo: FloatArray  # position_fraction range in which the element spans the cat
    frac_hi: FloatArray
    dist_lo_m: FloatArray  # outward travel must be >= this ...
    dist_hi_m: FloatArray  # ... and < this (relative to the launch point)


def _finite(name: str, value: float) -> float:
    v = float(value)
    if not np.isfinite(v):
        raise ValueError(f"{name} must be finite, got {value!r}")
    return v


def _landing_elements(
    building: Building,
) -> tuple[
    tuple[str, ...], tuple[SurfaceKind, ...], dict[str, FloatArray], IntArray, list[str | None]
]:
    """Landing elements in ``landing_ids`` order with their geometry."""
    elevation = {f.level: _finite(f"floor {f.level} elevation_m", f.elevation_m)
                 for f in building.floors}
    ids: list[str] = []
    kinds: list[SurfaceKind] = []
    facades: list[str | None] = []
    rows: list[tuple[float, float, float, float, float]] = []  # z, xlo, xhi, olo, ohi
    owner: list[int] = []
    inf = np.inf
    for s in building.surfaces:
        z = _finite(f"surface {s.id!r} elevation_m", s.elevation_m)
        lo = _finite(f"surface {s.id!r} from_facade_m", s.from_facade_m)
        hi = inf if s.to_facade_m is None else _finite(f"surface {s.id!r} to_facade_m",
                                                        s.to_facade_m)
        xlo = -inf if s.x_from_m is None else _finite(f"surface {s.id!r} x_from_m", s.x_from_m)
        xhi = inf if s.x_to_m is None else _finite(f"surface {s.id!r} x_to_m", s.x_to_m)
        ids.append(s.id)
        kinds.append(SurfaceKind(s.kind))
        facades.append(s.facade)
        rows.append((z, xlo, xhi, lo, hi))
        owner.append(-1)
    for i, o in enumerate(building.openings):
        if o.kind not in BALCONY_LIKE:
            continue
        if o.floor not in elevation:
            raise ValueError(f"opening {o.id!r}: floor {o.floor} does not exist")
        ids.append(o.id)
        kinds.append(SurfaceKind.CONCRETE)
        facades.append(o.facade)
        rows.append((elevation[o.floor], o.x_m, o.x_m + o.width_m, -inf, o.projection_m))
        owner.append(i)
    ids.append(GROUND_ID)
    kinds.append(SurfaceKind.CONCRETE)
    facades.append(None)
    rows.append((0.0, -inf, inf, -inf, inf))
    owner.append(-1)
    table = np.array(rows, dtype=float).reshape(-1, 5)
    geometry = {name: table[:, j] for j, name in enumerate(("z", "xlo", "xhi", "olo", "ohi"))}
    return tuple(ids), tuple(kinds), geometry, np.asarray(owner, dtype=np.intp), facades


def _opening_geometry(building: Building) -> dict[str, FloatArray]:
    """Start height, launch offset and span of every opening (building order)."""
    elevation = {f.level: f.elevation_m for f in building.floors}
    ops = building.openings
    try:  # the common case at array speed; any doubt takes the checked loop below
        z = np.array([elevation[o.floor] for o in ops], dtype=float)
        perch = np.array([o.perch_height_m for o in ops], dtype=float)
        proj = np.array([o.projection_m if o.kind in BALCONY_LIKE else 0.0 for o in ops],
                        dtype=float)
        x = np.array([o.x_m for o in ops], dtype=float)
        w = np.array([o.width_m for o in ops], dtype=float)
    except (KeyError, TypeError, ValueError):
        pass
    else:
        if all(np.all(np.isfinite(a)) for a in (z, perch, proj, x, w)) and np.all(w >= 0):
            return {"start": z + perch, "x0": proj, "x": x, "w": w}
    return _opening_geometry_checked(building, elevation)


def _opening_geometry_checked(building: Building,
                              elevation: dict[int, float]) -> dict[str, FloatArray]:
    """:func:`_opening_geometry` one opening at a time, naming the first bad value."""
    n = len(building.openings)
    out = {k: np.empty(n) for k in ("start", "x0", "x", "w")}
    for i, o in enumerate(building.openings):
        if o.floor not in elevation:
            raise ValueError(f"opening {o.id!r}: floor {o.floor} does not exist")
        name = f"opening {o.id!r}"
        out["start"][i] = _finite(f"floor {o.floor} elevation_m", elevation[o.floor]) + _finite(
            f"{name} perch_height_m", o.perch_height_m)
        out["x0"][i] = (_finite(f"{name} projection_m", o.projection_m)
                        if o.kind in BALCONY_LIKE else 0.0)
        out["x"][i] = _finite(f"{name} x_m", o.x_m)
        w = _finite(f"{name} width_m", o.width_m)
        if w < 0:
            raise ValueError(f"{name} width_m must not be negative, got {w}")
        out["w"][i] = w
    return out


def _candidate_pairs(building: Building) -> tuple[_Pairs, tuple[str, ...], tuple[SurfaceKind, ...]]:
    ids, kinds, el, owner, el_facades = _landing_elements(building)
    op = _opening_geometry(building)
    codes: dict[str | None, int] = {None: -1}
    for f in [*el_facades, *(o.facade for o in building.openings)]:
        codes.setdefault(f, len(codes))
    el_fac = np.array([codes[f] for f in el_facades], dtype=np.intp)
    op_fac = np.array([codes[o.facade] for o in building.openings], dtype=np.intp)

    n_el = len(ids)
    ground = n_el - 1
    # highest element first; the ground always last; ties keep landing_ids order
    zkey = el["z"].copy()
    zkey[ground] = -np.inf
    order = np.lexsort((np.arange(n_el), -zkey))
    z, xlo, xhi, olo, ohi = (el[k][order] for k in ("z", "xlo", "xhi", "olo", "ohi"))
    fac, own = el_fac[order], owner[order]
    is_ground = order == ground

    n_op = len(building.openings)
    parts: list[tuple[IntArray, IntArray]] = []
    # one facade at a time: an opening's candidates are its facade's elements and the shared
    # ones (the others are never valid, and leaving them out changes no cover above);
    # sorted(set()) rather than np.unique, whose first call imports numpy.ma (~10 ms a command)
    for code in sorted(set(op_fac.tolist())):
        on = np.flatnonzero(op_fac == code)
        cols_f = np.flatnonzero((fac == -1) | (fac == code))
        zf, xlof, xhif, olof, ohif = (v[cols_f] for v in (z, xlo, xhi, olo, ohi))
        ownf, groundf = own[cols_f], is_ground[cols_f]
        for a in range(0, on.size, _GEOMETRY_CHUNK):
            rows_c = on[a:a + _GEOMETRY_CHUNK]
            start = op["start"][rows_c, None]
            x0 = op["x0"][rows_c, None]
            x = op["x"][rows_c, None]
            right = x + op["w"][rows_c, None]
            right_open = np.maximum(right, np.nextafter(x, np.inf))  # a zero width is a point
            valid = (
                ((zf < start) | groundf)
                & (ownf != rows_c[:, None])
                & (xlof < right_open)
                & (xhif > x)
                & (ohif > x0)
            )
            full = valid & (xlof <= x) & (xhif >= right) & (olof <= x0)
            cover = np.maximum.accumulate(np.where(full, ohif, -np.inf), axis=1)
            above = np.concatenate([np.full((rows_c.size, 1), -np.inf), cover[:, :-1]], axis=1)
            keep = valid & (ohif > above)
            r, c = np.nonzero(keep)
            parts.append((rows_c[r], cols_f[c]))
    rows = np.concatenate([p[0] for p in parts]) if parts else np.zeros(0, np.intp)
    cols = np.concatenate([p[1] for p in parts]) if parts else np.zeros(0, np.intp)
    by_opening = np.lexsort((cols, rows))  # each opening's pairs together, highest first
    rows, cols = rows[by_opening], cols[by_opening]

    x = op["x"][rows]
    w = op["w"][rows]
    with np.errstate(divide="ignore", invalid="ignore"):
        frac_lo = np.where(w > 0, (xlo[cols] - x) / w, np.where(xlo[cols] <= x, -np.inf, np.inf))
        frac_hi = np.where(w > 0, (xhi[cols] - x) / w, np.where(xhi[cols] > x, np.inf, -np.inf))
    frac_lo = np.where(np.isnan(frac_lo), -np.inf, frac_lo)  # -inf - (-inf) cannot occur; guard
    frac_hi = np.where(np.isnan(frac_hi), np.inf, frac_hi)
    pairs = _Pairs(
        start=np.concatenate([[0], np.cumsum(np.bincount(rows, minlength=n_op))]).astype(np.intp),
        element=order[cols].astype(np.intp),
        drop_m=np.maximum(op["start"][rows] - z[cols], 0.0),
        # a sunken surface (below the datum, not the implicit ground) is entered at its rim
        test_drop_m=np.maximum(
            op["start"][rows] - np.where(is_ground[cols], z[cols], np.maximum(z[cols], 0.0)), 0.0
        ),
        frac_lo=frac_lo,
        frac_hi=frac_hi,
        dist_lo_m=olo[cols] - op["x0"][rows],
        dist_hi_m=ohi[cols] - op["x0"][rows],
    )
    return pairs, ids, kinds


@dataclass(frozen=True, slots=True)
class FallGeometry:
    """The sample-free part of a building's falls: every opening's candidate landing elements
    (see the module docstring), and the elements' ids and kinds."""

    pairs: _Pairs
    landing_ids: tuple[str, ...]
    landing_kinds: tuple[SurfaceKind, ...]

    @property
    def n_openings(self) -> int:
        return int(self.pairs.start.size - 1)

    def signatures(self) -> list[tuple[bytes, tuple[tuple[str, str], ...]]]:
        """Per opening (building order), everything its falls depend on besides the cats and
        the air: its candidate elements (id, kind) and their drops, spans and distances, exact
        to the bit. Two openings with equal signatures have equal falls for the same cats."""
        p = self.pairs
        rec = np.ascontiguousarray(np.stack(
            [p.drop_m, p.test_drop_m, p.frac_lo, p.frac_hi, p.dist_lo_m, p.dist_hi_m], axis=1))
        names = [(i, SurfaceKind(k).value) for i, k in
                 zip(self.landing_ids, self.landing_kinds, strict=True)]
        start = p.start.tolist()
        elem = p.element.tolist()
        return [(rec[a:b].tobytes(), tuple(names[j] for j in elem[a:b]))
                for a, b in zip(start[:-1], start[1:], strict=True)]

    def subset(self, rows: IntArray) -> FallGeometry:
        """The geometry of the openings at ``rows`` only (in that order)."""
        p = self.pairs
        rows = np.asarray(rows, dtype=np.intp)
        counts = (p.start[1:] - p.start[:-1])[rows]
        take = (np.repeat(p.start[rows] - np.cumsum(counts) + counts, counts)
                + np.arange(int(counts.sum()), dtype=np.intp)) if rows.size else np.zeros(
                    0, np.intp)
        sub = _Pairs(
            start=np.concatenate([[0], np.cumsum(counts)]).astype(np.intp),
            element=p.element[take], drop_m=p.drop_m[take], test_drop_m=p.test_drop_m[take],
            frac_lo=p.frac_lo[take], frac_hi=p.frac_hi[take], dist_lo_m=p.dist_lo_m[take],
            dist_hi_m=p.dist_hi_m[take],
        )
        return FallGeometry(sub, self.landing_ids, self.landing_kinds)


def fall_geometry(building: Building) -> FallGeometry:
    """The candidate landing elements of every opening of ``building`` (no samples needed)."""
    return FallGeometry(*_candidate_pairs(building))


def _check_samples(s: CatSamples) -> None:
    n = s.n
    if n < 1:
        raise ValueError("samples: at least one cat is needed")
    fields = ("mass_kg", "cda_tense_m2", "cda_spread_m2", "relax_fraction", "righting_time_s",
              "launch_speed_mps", "position_fraction")
    arrays = {f: np.asarray(getattr(s, f), dtype=float) for f in fields}
    for f, a in arrays.items():
        if a.shape != (n,):
            raise ValueError(f"samples.{f} must be a 1-D array of length {n}")
        if not np.all(np.isfinite(a)):
            raise ValueError(f"samples.{f} must be finite (no NaN or infinity)")
    for f in ("mass_kg", "cda_tense_m2", "cda_spread_m2"):
        if not np.all(arrays[f] > 0):
            raise ValueError(f"samples.{f} must be positive")
    for f in ("righting_time_s", "launch_speed_mps"):
        if not np.all(arrays[f] >= 0):
            raise ValueError(f"samples.{f} must not be negative")
    rf = arrays["relax_fraction"]
    if not np.all((rf > 0) & (rf < 1)):
        raise ValueError("samples.relax_fraction must lie strictly between 0 and 1")
    pf = arrays["position_fraction"]
    if not np.all((pf >= 0) & (pf < 1)):
        raise ValueError("samples.position_fraction must lie in [0, 1)")
    if not np.all(arrays["cda_spread_m2"] >= arrays["cda_tense_m2"]):
        raise ValueError("samples.cda_spread_m2 must not be smaller than samples.cda_tense_m2")


def _threshold_table(
    pairs: _Pairs, v0: FloatArray, b1: FloatArray, b2: FloatArray, f: FloatArray
) -> tuple[FloatArray, IntArray, IntArray]:
    """Drop thresholds per sample ``(n_rows, n_samples)`` and the row of each pair's lower and
    upper distance. Row 0: always reached (0); row 1: never reached (inf)."""
    lo, hi = pairs.dist_lo_m, pairs.dist_hi_m
    needed = np.concatenate([lo[lo > 0], hi[np.isfinite(hi) & (hi > 0)]])
    distances, inverse = np.unique(needed, return_inverse=True)
    rows = np.empty((distances.size + 2, v0.size))
    rows[0] = 0.0
    rows[1] = np.inf
    if distances.size:
        rows[2:] = _k.drop_to_reach(distances[:, None], v0, b1, b2, f, G0)
    row_lo = np.zeros(lo.size, dtype=np.intp)
    row_hi = np.ones(hi.size, dtype=np.intp)
    n_lo = int(np.count_nonzero(lo > 0))
    row_lo[lo > 0] = inverse[:n_lo] + 2
    row_hi[np.isfinite(hi) & (hi > 0)] = inverse[n_lo:] + 2
    return rows, row_lo, row_hi


def simulate(
    building: Building,
    samples: CatSamples,
    *,
    rho_kg_m3: float,
    progress: Callable[[int, int], None] | None = None,
) -> FallResults:
    """See :func:`petfall_audit.physics.simulate_falls`; ``rho_kg_m3`` is the site's air
    density (kg/m³)."""
    n_op, n_s = len(building.openings), samples.n
    drop = np.empty((n_op, n_s))
    landing = np.empty((n_op, n_s), dtype=np.intp)
    speed = np.empty((n_op, n_s))
    time = np.empty((n_op, n_s))
    righted = np.empty((n_op, n_s), dtype=bool)
    landing_ids: tuple[str, ...] = ()
    landing_kinds: tuple[SurfaceKind, ...] = ()
    for a, b, part in simulate_chunks(building, samples, rho_kg_m3=rho_kg_m3,
                                      progress=progress):
        drop[a:b], landing[a:b], speed[a:b] = part.drop_m, part.landing, part.impact_speed_mps
        time[a:b], righted[a:b] = part.fall_time_s, part.righted
        landing_ids, landing_kinds = part.landing_ids, part.landing_kinds
    if not landing_ids:  # no openings: still name the elements
        _, landing_ids, landing_kinds = _candidate_pairs(building)
    return FallResults(
        opening_ids=tuple(o.id for o in building.openings),
        landing_ids=landing_ids,
        landing_kinds=landing_kinds,
        drop_m=drop,
        landing=landing,
        impact_speed_mps=speed,
        fall_time_s=time,
        righted=righted,
        rho_kg_m3=float(rho_kg_m3),
    )


def simulate_chunks(
    building: Building,
    samples: CatSamples,
    *,
    rho_kg_m3: float,
    progress: Callable[[int, int], None] | None = None,
    chunk_elements: int = _CHUNK_ELEMENTS,
    geometry: FallGeometry | None = None,
    rows: IntArray | None = None,
    then: Callable[[int, int, FallResults], None] | None = None,
) -> Iterator[tuple[int, int, FallResults]]:
    """The falls of :func:`simulate`, a block of openings at a time: yields ``(a, b, falls)``
    with the falls of openings ``a`` to ``b - 1`` (building order), so that a caller can
    summarise each block and let it go: memory stays bounded whatever the building's size.

    Blocks are computed ahead on up to two cores (:mod:`petfall_audit._threads`);
    ``then(a, b, falls)``, when given, runs right after each block on the thread that computed
    it, for the caller's own work on the block (it must only write what belongs to rows ``a``
    to ``b - 1``), before the block is yielded.

    ``geometry``: :func:`fall_geometry` of ``building`` when the caller has it already;
    ``rows``: simulate only the openings at these indices (``a`` and ``b`` then count within
    ``rows``). Each opening's falls are the same, bit for bit, whichever openings are simulated
    with it: nothing in a block depends on the other openings of the block."""
    _check_samples(samples)
    rho = float(rho_kg_m3)
    g = G0
    m = np.asarray(samples.mass_kg, dtype=float)
    b1 = _k.drag_per_mass(rho, samples.cda_tense_m2, m)
    b2 = _k.drag_per_mass(rho, samples.cda_spread_m2, m)
    f = np.asarray(samples.relax_fraction, dtype=float)
    v0 = np.asarray(samples.launch_speed_mps, dtype=float)
    frac = np.asarray(samples.position_fraction, dtype=float)
    righting = np.asarray(samples.righting_time_s, dtype=float)

    geo = fall_geometry(building) if geometry is None else geometry
    all_ids = tuple(o.id for o in building.openings)
    if rows is not None:
        geo = geo.subset(rows)
        ids = tuple(all_ids[i] for i in np.asarray(rows, dtype=np.intp).tolist())
    else:
        ids = all_ids
    pairs, landing_ids, landing_kinds = geo.pairs, geo.landing_ids, geo.landing_kinds
    table, row_lo, row_hi = _threshold_table(pairs, v0, b1, b2, f)
    # a padding pair that never catches: its drop 0 is not below its upper threshold 0
    # (its other checks are trivial so that they can be skipped)
    never = pairs.element.size
    p_elem = np.append(pairs.element, 0)
    p_drop = np.append(pairs.drop_m, 0.0)
    p_test = np.append(pairs.test_drop_m, 0.0)
    p_flo = np.append(pairs.frac_lo, -np.inf)
    p_fhi = np.append(pairs.frac_hi, np.inf)
    p_rlo = np.append(row_lo, 0)
    p_rhi = np.append(row_hi, 0)

    consts = _k.FallConstants(b1, b2, f, g)
    moving = bool(np.any(v0 > 0))

    n_op, n_s = len(ids), samples.n
    counts = np.diff(pairs.start)
    step = max(1, int(chunk_elements) // n_s)
    fr = frac[None, :]

    def block(a: int) -> tuple[int, int, FallResults]:
        b = min(a + step, n_op)
        # the last pair of every opening always catches; test the others from the lowest up,
        # so that the highest catching one is kept
        last = pairs.start[a + 1:b + 1] - 1
        h = np.repeat(p_drop[last][:, None], n_s, axis=1)
        lnd = np.repeat(p_elem[last][:, None], n_s, axis=1)
        for k in range(int(counts[a:b].max()) - 2, -1, -1):
            pk = np.where(k < counts[a:b] - 1, pairs.start[a:b] + k, never)
            d = p_drop[pk][:, None]
            dt = p_test[pk][:, None]
            rhi, rlo, flo, fhi = p_rhi[pk], p_rlo[pk], p_flo[pk], p_fhi[pk]
            catches = dt < table[rhi]
            if np.any(rlo != 0):
                catches &= dt >= table[rlo]
            if np.any(flo > 0):
                catches &= fr >= flo[:, None]
            if np.any(fhi < 1):
                catches &= fr < fhi[:, None]
            np.copyto(h, d, where=catches)
            np.copyto(lnd, p_elem[pk][:, None], where=catches)
        speed, time = _k.fall_rows(h, consts)
        if moving:  # the outward part of the impact speed
            vx = _k.outward_speed(h, v0, b1, b2, f)
            np.hypot(speed, vx, out=speed)
        part = FallResults(
            opening_ids=ids[a:b],
            landing_ids=landing_ids,
            landing_kinds=landing_kinds,
            drop_m=h,
            landing=lnd,
            impact_speed_mps=speed,
            fall_time_s=time,
            righted=time >= righting[None, :],
            rho_kg_m3=rho,
        )
        if then is not None:
            then(a, b, part)
        return a, b, part

    if progress is not None:
        progress(0, n_op)
    for a, b, part in in_order_ahead(block, range(0, n_op, step)):
        yield a, b, part
        if progress is not None:
            progress(b, n_op)
