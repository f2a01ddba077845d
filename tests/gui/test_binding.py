"""The Qt binding keeps Python's reference counts: a defective build aborts the app at random.

PySide6 6.12.0 on Python 3.11 returns ``None`` and ``True`` from wrapped calls without taking a
reference, so a long session ends in "Fatal Python error: none_dealloc". This check names the
cause instead (observed here; 6.11.3 is sound).
"""

from __future__ import annotations

import ctypes
import sys

import pytest
from PySide6.QtCore import QObject, Signal
from PySide6.QtWidgets import QApplication

pytestmark = pytest.mark.gui


class _Probe(QObject):
    signal = Signal(int)


@pytest.mark.skipif(sys.version_info >= (3, 12), reason="None and True are immortal from 3.12")
def test_qt_calls_keep_reference_counts_of_none_and_true(qapp: QApplication) -> None:
    probe = _Probe()
    probe.signal.connect(lambda value: None)
    none_before, true_before = sys.getrefcount(None), sys.getrefcount(True)
    for _ in range(20):
        qapp.processEvents()  # returns None
        probe.signal.emit(1)  # returns True
    none_lost = none_before - sys.getrefcount(None)
    true_lost = true_before - sys.getrefcount(True)
    for obj, lost in ((None, none_lost), (True, true_lost)):  # give back what the check took
        for _ in range(max(lost, 0)):
            ctypes.pythonapi.Py_IncRef(ctypes.py_object(obj))
    import PySide6

    assert none_lost < 10 and true_lost < 10, (
        f"PySide6 {PySide6.__version__} drops references to None ({none_lost}) and True "
        f"({true_lost}) on every call; the app will abort. Install a sound build (e.g. 6.11.3)."
    )
