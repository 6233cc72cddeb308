"""A tiny observer: the change signals of the Qt-free models.

Plain Python so that the models are testable without a QApplication; views
connect their ``_update_*`` methods to these and Qt never sees the models.
"""

from __future__ import annotations

from typing import Callable


class Signal:
    """A list of callbacks, called in connection order by `emit`.

    An exception in a callback propagates (a failing view update is a bug and
    must surface in tests, not be swallowed).
    """

    __slots__ = ("_callbacks", "_blocked")

    def __init__(self) -> None:
        self._callbacks: list[Callable] = []
        self._blocked = 0

    def connect(self, callback: Callable) -> Callable:
        if callback not in self._callbacks:
            self._callbacks.append(callback)
        return callback

    def disconnect(self, callback: Callable) -> None:
        try:
            self._callbacks.remove(callback)
        except ValueError:
            pass

    def emit(self, *args) -> None:
        if self._blocked:
            return
        for callback in list(self._callbacks):
            callback(*args)

    def blocked(self) -> "_Block":
        """``with signal.blocked(): ...`` — emit nothing inside."""
        return _Block(self)

    def __len__(self) -> int:
        return len(self._callbacks)


def disconnect_owner(model, owner) -> int:
    """Disconnect from every `Signal` attribute of ``model`` the callbacks bound to ``owner`` or its
    child widgets (views detach when the window closes; the models may live on). Returns the count."""
    count = 0
    for signal in vars(model).values():
        if not isinstance(signal, Signal):
            continue
        for callback in list(signal._callbacks):
            target = getattr(callback, "__self__", None)
            if target is None:
                continue
            if target is owner or _is_child(target, owner):
                signal.disconnect(callback)
                count += 1
    return count


def _is_child(target, owner) -> bool:
    parent = getattr(target, "parent", None)
    seen = 0
    try:
        node = parent() if callable(parent) else None
    except RuntimeError:  # already deleted
        return True
    while node is not None and seen < 64:
        if node is owner:
            return True
        try:
            node = node.parent()
        except (RuntimeError, AttributeError):
            return False
        seen += 1
    return False


class _Block:
    def __init__(self, signal: Signal) -> None:
        self._signal = signal

    def __enter__(self) -> Signal:
        self._signal._blocked += 1
        return self._signal

    def __exit__(self, *exc) -> None:
        self._signal._blocked -= 1
