"""Frozen records: the model's value types, made quickly.

Every value type of dxfcheck is a frozen dataclass.  For each one the
standard library compiles six methods when its module is imported
(``__init__``, ``__repr__``, ``__eq__``, ``__hash__``, ``__setattr__`` and
``__delattr__``), about 0.8 ms a class on our two-core machine (CPython
3.11 to 3.13); ``solve --json`` defines 53, a fifth of a small drawing's
whole run (issue 21).  :func:`record` has the standard library compile only
``__init__`` and gives each class the other five from this module, written
once, with the frozen dataclass's behaviour:

* ``repr`` -- ``Name(field=value, ...)`` over the fields with ``repr=True``,
  ``...`` where an object shows itself again;
* ``==`` -- the tuples of the fields with ``compare=True``, for two objects
  of the same class (otherwise ``NotImplemented``); ``hash`` -- of that
  tuple (fields with ``hash=False`` left out, as the standard library does);
* assigning or deleting an attribute raises
  :class:`dataclasses.FrozenInstanceError` with the standard library's
  message; ``__init__`` sets each field once, which is the only assignment
  allowed (``__post_init__`` may still use ``object.__setattr__``).

Everything else is the standard library's: :func:`dataclasses.fields`,
:func:`~dataclasses.replace`, :func:`~dataclasses.asdict`, ``__match_args__``,
defaults and factories, pickling and copying.  A test builds the standard
library's frozen twin of every record the demos' solutions hold and compares
the two (``tests/core/test_records.py``).

Type checkers see ``@record(frozen=True)`` as ``@dataclass(frozen=True)``
(the name is the standard decorator for them), so the static view is exact.
Use::

    from dxfcheck.core.records import record

    @record(frozen=True)
    class Pin:
        name: str
        at_mm: tuple[float, float]
"""

from __future__ import annotations

import dataclasses
import operator
import reprlib
from collections.abc import Callable
from typing import TYPE_CHECKING, Any, TypeVar

__all__ = ["record"]

_T = TypeVar("_T")

#: Class attributes :func:`record` sets: the field names each method reads.
_REPR_NAMES = "__record_repr_names__"
_COMPARED = "__record_compared__"
_HASHED = "__record_hashed__"

#: The methods :func:`record` gives; a record's body may not define them.
_GIVEN = ("__repr__", "__eq__", "__hash__", "__setattr__", "__delattr__")


def _tuple_getter(names: tuple[str, ...]) -> Callable[[Any], tuple[Any, ...]]:
    """A C-speed ``lambda obj: (obj.a, obj.b, ...)`` that always returns a tuple."""
    if len(names) >= 2:
        return operator.attrgetter(*names)
    if len(names) == 1:
        one = operator.attrgetter(names[0])
        return lambda obj: (one(obj),)
    return lambda obj: ()


@reprlib.recursive_repr()
def _repr(self: Any) -> str:
    values = ", ".join(f"{name}={getattr(self, name)!r}" for name in getattr(self, _REPR_NAMES))
    return f"{type(self).__qualname__}({values})"


def _eq(self: Any, other: object) -> Any:
    if other.__class__ is self.__class__:
        compared = getattr(self, _COMPARED)
        return compared(self) == compared(other)
    return NotImplemented


def _hash(self: Any) -> int:
    return hash(getattr(self, _HASHED)(self))


def _setattr(self: Any, name: str, value: object) -> None:
    values = self.__dict__
    if name in values or name not in self.__dataclass_fields__:
        raise dataclasses.FrozenInstanceError(f"cannot assign to field {name!r}")
    values[name] = value  # the one assignment, by __init__


def _delattr(self: Any, name: str) -> None:
    raise dataclasses.FrozenInstanceError(f"cannot delete field {name!r}")


def _make(cls: type[_T]) -> type[_T]:
    given = [name for name in _GIVEN if name in cls.__dict__]
    if given:
        raise TypeError(f"record {cls.__qualname__} defines {', '.join(given)}; a record gives these itself")
    made = dataclasses.dataclass(cls, repr=False, eq=False)
    fields = dataclasses.fields(made)  # type: ignore[arg-type]
    unset = [f.name for f in fields if not f.init and f.default is dataclasses.MISSING]
    if unset or "__slots__" in cls.__dict__:
        raise TypeError(f"record {cls.__qualname__}: every field is set by __init__ and no __slots__ ({unset})")
    compared = tuple(f.name for f in fields if f.compare)
    hashed = tuple(f.name for f in fields if (f.compare if f.hash is None else f.hash))
    setattr(made, _REPR_NAMES, tuple(f.name for f in fields if f.repr))
    setattr(made, _COMPARED, staticmethod(_tuple_getter(compared)))
    setattr(made, _HASHED, staticmethod(_tuple_getter(hashed)))
    for name, method in zip(_GIVEN, (_repr, _eq, _hash, _setattr, _delattr), strict=True):
        setattr(made, name, method)
    return made


def _record(cls: type[_T] | None = None, /, *, frozen: bool = False) -> Any:
    """``@record(frozen=True)``: a frozen dataclass (see the module's text)."""
    if not frozen:
        raise TypeError("a record is frozen: write @record(frozen=True) (and @dataclass for a mutable class)")
    return _make if cls is None else _make(cls)


if TYPE_CHECKING:  # the static view: the standard library's own decorator
    from dataclasses import dataclass as record
else:
    record = _record
