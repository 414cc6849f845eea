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
  a ``__repr__``, ``__eq__`` or ``__hash__`` the body defines is kept, and a
  body with ``__eq__`` alone still gets the fields' hash, as there;
* assigning or deleting a field, a ``ClassVar`` or ``InitVar`` name or any
  other attribute raises :class:`dataclasses.FrozenInstanceError` with the
  standard library's message (a plain subclass's own attributes excepted,
  as there); ``__init__`` sets each field it sets once, which is the only
  assignment allowed (``__post_init__`` may still use
  ``object.__setattr__``, for a ``field(init=False)`` too).

Everything else is the standard library's: :func:`dataclasses.fields`,
:func:`~dataclasses.replace`, :func:`~dataclasses.asdict`, ``__match_args__``,
defaults and factories, pickling and copying.  A test builds the standard
library's frozen twin of every record the demos' solutions hold, and of a
catalogue of class bodies, and compares the two (``tests/core/test_records.py``).

Where a record differs, it says so when the class is defined, except for
the last point:

* a body defining ``__setattr__`` or ``__delattr__``, or ``__slots__``, and a
  field that is a descriptor or a base class's slot, are refused (a record
  holds plain values in its instance dict);
* the decorator takes no option but ``frozen=True`` (``order``, ``slots``,
  ``kw_only``... are refused; ``KW_ONLY`` and ``field(kw_only=True)`` work);
* records inherit from records and plain classes; they do not mix with the
  standard library's dataclasses in one hierarchy (its frozen dataclass
  refuses a record base, as a record refuses its base, because
  ``__dataclass_params__`` shows how the standard library was called:
  ``frozen=False``; a test keeps dxfcheck free of such mixes).

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
#: The fields ``__init__`` assigns (the only names assigned, once each), and
#: every field's name (never assigned, even on a plain subclass).
_SETTABLE = "__record_settable__"
_FIELD_NAMES = "__record_field_names__"

#: The methods a record's body may not define (as for a frozen dataclass).
_REFUSED = ("__setattr__", "__delattr__")


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


def _own_record(obj: Any) -> bool:
    """Whether ``obj``'s class is a record itself (not a plain subclass of one)."""
    return _SETTABLE in type(obj).__dict__


def _setattr(self: Any, name: str, value: object) -> None:
    values = self.__dict__
    if name in getattr(self, _SETTABLE) and name not in values:
        values[name] = value  # the one assignment, by __init__
    elif _own_record(self) or name in getattr(self, _FIELD_NAMES):
        raise dataclasses.FrozenInstanceError(f"cannot assign to field {name!r}")
    else:  # a plain subclass's own attribute, as the standard library allows
        object.__setattr__(self, name, value)


def _delattr(self: Any, name: str) -> None:
    if _own_record(self) or name in getattr(self, _FIELD_NAMES):
        raise dataclasses.FrozenInstanceError(f"cannot delete field {name!r}")
    object.__delattr__(self, name)


def _explicit_hash(cls: type) -> bool:
    """Whether the body defines ``__hash__`` (the standard library's test: a
    body with ``__eq__`` alone gets ``__hash__ = None`` from Python, which
    does not count)."""
    given = cls.__dict__.get("__hash__", dataclasses.MISSING)
    return not (given is dataclasses.MISSING or (given is None and "__eq__" in cls.__dict__))


def _refuse(cls: type, made: type) -> None:
    """Refuse what the shared methods cannot serve as the standard library would."""
    refused = [name for name in _REFUSED if name in cls.__dict__]
    if refused:  # the standard library refuses these on a frozen class too
        raise TypeError(f"Cannot overwrite attribute {refused[0]} in class {cls.__name__}")
    if "__slots__" in cls.__dict__:
        raise TypeError(f"record {cls.__qualname__}: a record keeps its fields in the instance dict, not __slots__")
    for f in dataclasses.fields(made):
        held = next((k.__dict__[f.name] for k in made.__mro__ if f.name in k.__dict__), None)
        if hasattr(type(held), "__set__") or hasattr(type(held), "__delete__"):
            raise TypeError(
                f"record {cls.__qualname__}: field {f.name!r} is a descriptor or a slot (a record holds plain values)"
            )


def _make(cls: type[_T]) -> type[_T]:
    hashed_given = _explicit_hash(cls)
    made = dataclasses.dataclass(cls, repr=False, eq=False)
    _refuse(cls, made)
    fields = dataclasses.fields(made)  # type: ignore[arg-type]
    compared = tuple(f.name for f in fields if f.compare)
    hashed = tuple(f.name for f in fields if (f.compare if f.hash is None else f.hash))
    settable = frozenset(f.name for f in fields if f.init or f.default_factory is not dataclasses.MISSING)
    setattr(made, _SETTABLE, settable)
    setattr(made, _FIELD_NAMES, frozenset(f.name for f in fields))
    setattr(made, _REPR_NAMES, tuple(f.name for f in fields if f.repr))
    setattr(made, _COMPARED, staticmethod(_tuple_getter(compared)))
    setattr(made, _HASHED, staticmethod(_tuple_getter(hashed)))
    # a repr, eq or hash the body defines is kept, as the standard library keeps it
    kept = {"__repr__": "__repr__" in cls.__dict__, "__eq__": "__eq__" in cls.__dict__, "__hash__": hashed_given}
    methods = {"__repr__": _repr, "__eq__": _eq, "__hash__": _hash, "__setattr__": _setattr, "__delattr__": _delattr}
    for name, method in methods.items():
        if not kept.get(name, False):
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
