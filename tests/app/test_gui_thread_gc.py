"""Cyclic garbage is collected on the GUI thread only (app/gui_thread_gc.py): a solver thread
that collected a widget would deadlock with the GUI thread inside Qt's destructor."""

import gc
import threading
import weakref

from app.gui_thread_gc import GuiThreadCollector, collect_on_gui_thread


class _Node:
    pass


def _cycle():
    a, b = _Node(), _Node()
    a.other, b.other = b, a
    return weakref.ref(a)


def test_a_worker_thread_never_collects_and_the_gui_timer_does(qapp, qtbot, gui_thread_gc):
    assert not gc.isenabled()
    ref = _cycle()
    # a worker allocating far past the collector's threshold does not collect the cycle
    worker = threading.Thread(target=lambda: [_Node() for _ in range(5 * gc.get_threshold()[0])])
    worker.start()
    worker.join()
    assert ref() is not None
    # the GUI thread's timer collects it once the counts pass the thresholds
    kept = [_Node() for _ in range(2 * gc.get_threshold()[0])]  # live allocations raise the count
    qtbot.waitUntil(lambda: ref() is None, timeout=5000)
    assert len(kept) > gc.get_threshold()[0]


def test_stop_gives_collection_back_and_install_is_once_per_application(qapp):
    # the autouse fixture has one collector running; installing again finds it
    assert collect_on_gui_thread(qapp) is qapp.findChild(GuiThreadCollector)
    collector = GuiThreadCollector()
    collector.stop()
    assert not gc.isenabled()  # it was off when this one started, so it stays off
