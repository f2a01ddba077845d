"""Desktop app timings: cold start to a shown window, and edit to updated results.

Run: ``QT_QPA_PLATFORM=offscreen python benchmarks/bench_gui.py [--edits N]``

Prints the cold start (a fresh Python process: imports, sample building, window shown; target
at most 3 s) and, on the large tower (60 floors x 20 openings), the median time from an edit to
the updated results in the window (target at most 150 ms), beside the time of the bare
assessment in the same process as the baseline that the window's overhead is measured against;
then the median time from an edit to the repainted full-precision results (target at most
250 ms) beside the computation behind them, as the worker timed it (the window's overhead
over it: at most 2x). Edits alternate a netting change and a balcony reaching further out.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[1]

_CHILD = """
import sys, time
from PySide6.QtWidgets import QApplication
app = QApplication(sys.argv[:1])
from petfall_audit.gui.app import create_window
window = create_window(None)
window.show()
app.processEvents()
print("shown", flush=True)
"""


def cold_start_s(runs: int = 3) -> float:
    """Best of ``runs`` fresh processes: spawn to the window shown (s)."""
    env = dict(os.environ)
    env.setdefault("QT_QPA_PLATFORM", "offscreen")
    times = []
    with tempfile.TemporaryDirectory() as home:
        env["PETFALL_AUDIT_HOME"] = home
        for _ in range(runs):
            start = time.perf_counter()
            proc = subprocess.Popen([sys.executable, "-c", _CHILD], cwd=ROOT, env=env,
                                    stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True)
            assert proc.stdout is not None
            line = proc.stdout.readline()
            times.append(time.perf_counter() - start)
            proc.kill()
            proc.wait()
            if line.strip() != "shown":
                raise RuntimeError("the window did not start")
    return min(times)


def edit_to_results_s(edits: int) -> tuple[list[float], list[float], int]:
    """Edit-to-results times in the window (s), bare assessment times (s), samples used."""
    with tempfile.TemporaryDirectory() as home:
        os.environ["PETFALL_AUDIT_HOME"] = home
        from PySide6.QtWidgets import QApplication

        app = QApplication.instance() or QApplication(sys.argv[:1])
        from petfall_audit.demo import make_large_tower
        from petfall_audit.editing.commands import SetOpeningFields
        from petfall_audit.editing.document import Document
        from petfall_audit.gui.dialogs import Prompts
        from petfall_audit.gui.main_window import MainWindow
        from petfall_audit.risk import assess

        class _Quiet(Prompts):
            def ask_save_changes(self, parent, name):  # type: ignore[no-untyped-def]
                return "discard"

        building = make_large_tower()
        window = MainWindow(Document(building), prompts=_Quiet())
        window.show()
        done: list[object] = []
        failures: list[str] = []
        window.results_updated.connect(done.append)
        window.results_failed.connect(failures.append)

        def wait() -> None:
            deadline = time.perf_counter() + 60
            while not done and not failures and time.perf_counter() < deadline:
                app.processEvents()
                time.sleep(0.0005)
            if failures:
                raise RuntimeError(f"results failed: {failures[-1]}")
            if not done:
                raise RuntimeError("no results within 60 s")

        wait()
        samples = window.recomputer.samples
        ids = [o.id for o in building.openings]
        times = []
        for i in range(edits):
            done.clear()
            opening_id = ids[(i * 97) % len(ids)]
            current = window.document.building.opening(opening_id).netting_mesh_mm
            mesh = 30.0 if current is None else None  # always a real change
            start = time.perf_counter()
            window.history.push(SetOpeningFields([opening_id], {"netting_mesh_mm": mesh}))
            wait()
            app.processEvents()  # the table repaints with the new results
            times.append(time.perf_counter() - start)
        bare = []
        for _ in range(max(3, edits // 3)):
            start = time.perf_counter()
            assess(window.document.building, samples=samples, seed=1)
            bare.append(time.perf_counter() - start)
        window.close()
        return times, bare, samples


def _edits(building: Any, count: int) -> list[tuple[str, dict[str, Any]]]:
    """``count`` real edits, alternating a netting change (the likelihood only) and a balcony
    reaching further out (the falls of that balcony and of the openings above it)."""
    ids = [o.id for o in building.openings]
    balconies = [o.id for o in building.openings if o.kind.value == "balcony"]
    out: list[tuple[str, dict[str, Any]]] = []
    for i in range(count):
        if i % 2 == 0:
            out.append((ids[(i * 97) % len(ids)], {"netting_mesh_mm": "toggle"}))
        else:
            out.append((balconies[(i * 37) % len(balconies)], {"projection_m": 0.1}))
    return out


def edit_to_full_results_s(edits: int) -> tuple[list[float], list[float], list[float], int]:
    """On the large tower, per edit: time from the edit to the repainted full-precision results
    in the window (s), the computation behind them (s, as the worker timed it), and a bare
    full assessment of the edited building (s); and the samples of the full results."""
    with tempfile.TemporaryDirectory() as home:
        os.environ["PETFALL_AUDIT_HOME"] = home
        from PySide6.QtWidgets import QApplication

        app = QApplication.instance() or QApplication(sys.argv[:1])
        from petfall_audit.demo import make_large_tower
        from petfall_audit.editing.commands import SetOpeningFields
        from petfall_audit.editing.document import Document
        from petfall_audit.gui.dialogs import Prompts
        from petfall_audit.gui.main_window import MainWindow
        from petfall_audit.risk import assess

        class _Quiet(Prompts):
            def ask_save_changes(self, parent, name):  # type: ignore[no-untyped-def]
                return "discard"

        building = make_large_tower()
        window = MainWindow(Document(building), prompts=_Quiet())
        window.show()
        full: list[object] = []
        compute: list[float] = []
        failures: list[str] = []
        window.results_refined.connect(full.append)
        window.recomputer.refined.connect(lambda _g, _a, seconds: compute.append(seconds))
        window.results_failed.connect(failures.append)

        def wait() -> None:
            deadline = time.perf_counter() + 120
            while not full and not failures and time.perf_counter() < deadline:
                app.processEvents()
                time.sleep(0.0005)
            if failures:
                raise RuntimeError(f"results failed: {failures[-1]}")
            if not full:
                raise RuntimeError("no full results within 120 s")

        wait()
        samples = window.recomputer.final_samples
        times: list[float] = []
        computed: list[float] = []
        bare: list[float] = []
        for opening_id, change in _edits(building, edits):
            full.clear()
            compute.clear()
            o = window.document.building.opening(opening_id)
            if "netting_mesh_mm" in change:
                change = {"netting_mesh_mm": 30.0 if o.netting_mesh_mm is None else None}
            else:
                change = {"projection_m": o.projection_m + change["projection_m"]}
            start = time.perf_counter()
            window.history.push(SetOpeningFields([opening_id], change))
            wait()
            app.processEvents()  # the views repaint with the new results
            times.append(time.perf_counter() - start)
            computed.append(sum(compute))
        for _ in range(3):
            start = time.perf_counter()
            assess(window.document.building, samples=samples, seed=1, keep_falls=False)
            bare.append(time.perf_counter() - start)
        window.close()
        return times, computed, bare, samples


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--edits", type=int, default=60,
                        help="edits to time (default 60: an edit takes tens of ms, and the "
                             "median of few varies with the machine's other work)")
    parser.add_argument("--only-full", action="store_true",
                        help="time only edit to full results (skip the cold start and quick run)")
    args = parser.parse_args()
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    sys.path.insert(0, str(ROOT))
    from petfall_audit.gui.qt_messages import qt_messages_routed

    with qt_messages_routed():  # Qt's notes off the terminal, as in the app
        return _run(args)


def _run(args: argparse.Namespace) -> int:
    if args.only_full:
        return _full(args.edits)
    cold = cold_start_s()
    print(f"cold start to shown window: {cold:.2f} s (target <= 3 s) "
          f"{'OK' if cold <= 3.0 else 'OVER'}")
    times, bare, samples = edit_to_results_s(args.edits)
    median = statistics.median(times)
    base = statistics.median(bare)
    print(f"edit to updated results, large tower, {samples} samples per opening: median "
          f"{median * 1000:.0f} ms over {len(times)} edits (target <= 150 ms) "
          f"{'OK' if median <= 0.150 else 'OVER'}")
    print(f"baseline, bare assessment in this process: median {base * 1000:.0f} ms; "
          f"window overhead ratio {median / base:.2f}")
    return _full(args.edits)


def _full(edits: int) -> int:
    times, computed, bare, samples = edit_to_full_results_s(edits)
    median = statistics.median(times)
    work = statistics.median(computed)
    print(f"edit to repainted full results, large tower, {samples} samples per opening: median "
          f"{median * 1000:.0f} ms over {len(times)} edits (target <= 250 ms) "
          f"{'OK' if median <= 0.250 else 'OVER'}")
    print(f"the computation behind them (worker): median {work * 1000:.0f} ms; window overhead "
          f"ratio {median / work:.2f} (target <= 2) {'OK' if median <= 2 * work else 'OVER'}")
    print(f"for comparison, a bare full assessment of the tower: median "
          f"{statistics.median(bare) * 1000:.0f} ms")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
