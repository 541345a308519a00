"""The messages between the language server and its worker process, with findings sent once.

After an edit most findings of a manuscript are the very objects the worker sent last time
(:mod:`verifier.lsp.engine` keeps them).  Each end of the pipe keeps the findings of the
last :class:`~verifier.lsp.model.Checked` that went through it, in order; a finding sent
again travels as its index in that list, and the receiver puts back the object it already
has.  Both ends replace their list with every ``Checked``, so they always agree; a new
worker starts both with an empty list.  A message that cannot be read (the two ends
disagree after all) is answered like a crashed worker: the server starts a new one.
"""

from __future__ import annotations

import io
import pickle
from typing import Any

from verifier.lsp.model import Checked, Finding

_TAG = "qreferee-finding"


class Table:
    """One end's findings of the last ``Checked`` message, by position."""

    def __init__(self) -> None:
        self.findings: list[Finding] = []
        self._index: dict[int, int] = {}  # id(finding) -> position

    def replace(self, findings: list[Finding]) -> None:
        self.findings = list(findings)
        self._index = {id(f): i for i, f in enumerate(self.findings)}

    def position(self, obj: object) -> int | None:
        i = self._index.get(id(obj))
        return i if i is not None and self.findings[i] is obj else None


class _Pickler(pickle.Pickler):
    def __init__(self, file: io.BytesIO, table: Table) -> None:
        super().__init__(file, pickle.HIGHEST_PROTOCOL)
        self.table = table

    def persistent_id(self, obj: Any) -> Any:
        if type(obj) is Finding:
            i = self.table.position(obj)
            if i is not None:
                return (_TAG, i)
        return None


class _Unpickler(pickle.Unpickler):
    def __init__(self, file: io.BytesIO, table: Table) -> None:
        super().__init__(file)
        self.table = table

    def persistent_load(self, pid: Any) -> Any:
        if isinstance(pid, tuple) and len(pid) == 2 and pid[0] == _TAG and isinstance(pid[1], int):
            if 0 <= pid[1] < len(self.table.findings):
                return self.table.findings[pid[1]]
        raise pickle.UnpicklingError(f"unknown finding {pid!r}")


def dumps(message: object, table: Table) -> bytes:
    """``message`` as bytes; findings the other end has are sent as their positions."""
    buffer = io.BytesIO()
    _Pickler(buffer, table).dump(message)
    if isinstance(message, Checked):
        table.replace(message.findings)
    return buffer.getvalue()


def loads(data: bytes, table: Table) -> object:
    """The message of :func:`dumps`, with the findings it refers to put back."""
    message = _Unpickler(io.BytesIO(data), table).load()
    if isinstance(message, Checked):
        table.replace(message.findings)
    return message
