"""A tiny, Qt-free event emitter: named events with plain callbacks."""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable
from typing import Any


class Events:
    """Connect callbacks to named events and fire them.

    >>> ev = Events()
    >>> seen = []
    >>> ev.connect("model_changed", seen.append)
    >>> ev.emit("model_changed", 1)
    >>> seen
    [1]
    """

    def __init__(self) -> None:
        self._callbacks: dict[str, list[Callable[..., Any]]] = defaultdict(list)

    def connect(self, name: str, callback: Callable[..., Any]) -> None:
        self._callbacks[name].append(callback)

    def disconnect(self, name: str, callback: Callable[..., Any]) -> None:
        if callback in self._callbacks[name]:
            self._callbacks[name].remove(callback)

    def emit(self, name: str, *args: Any) -> None:
        for callback in list(self._callbacks[name]):
            callback(*args)
