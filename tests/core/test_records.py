"""Frozen records (:mod:`dxfcheck.core.records`) behave as the standard
library's frozen dataclasses.

The reference is the standard library itself (``dataclasses``, Python
documentation, "Frozen instances" and the ``eq``/``unsafe_hash`` table): each
check builds the standard library's frozen twin of a class and compares the
two -- on a catalogue of small classes that covers the field options, and on
every record the demos' and the catalogue brakes' solutions and judgements
hold.  (No engineering source: this is the model's plumbing.)
"""

from __future__ import annotations

import copy
import dataclasses
import math
import pickle
from collections.abc import Iterator
from pathlib import Path
from typing import Any, ClassVar

import pytest
from common import CATALOGUE, ROOT

from dxfcheck.core.records import record

#: Class bodies (after ``class C:``) covering the field options records use
#: and some they do not; each is built twice, as a record and as the
#: standard library's frozen dataclass.
BODIES = {
    "plain": "    a: int\n    b: str\n",
    "no fields": "    pass\n",
    "one field": "    a: float\n",
    "defaults": "    a: int\n    b: tuple = ()\n    c: float = 1.5\n",
    "factory": "    a: int\n    b: list = field(default_factory=list)\n",
    "repr off": "    a: int\n    b: int = field(default=0, repr=False)\n",
    "compare off": "    a: int\n    b: int = field(default=0, compare=False)\n",
    "hash off": "    a: int\n    b: int = field(default=0, hash=False)\n",
    "hash on, compare off": "    a: int\n    b: int = field(default=0, compare=False, hash=True)\n",
    "post init": (
        "    a: int\n    b: int = 0\n"
        "    def __post_init__(self):\n        object.__setattr__(self, 'b', self.b or 2 * self.a)\n"
    ),
    "methods and properties": "    a: float\n    @property\n    def twice(self):\n        return 2 * self.a\n",
    "class variable": "    unit: ClassVar[str] = 'mm'\n    a: int\n",
    "init-only variable": (
        "    a: float\n    scale: InitVar[float] = 1.0\n"
        "    def __post_init__(self, scale):\n        object.__setattr__(self, 'a', self.a * scale)\n"
    ),
    "derived field": (
        "    a: float\n    b: float = field(init=False)\n"
        "    def __post_init__(self):\n        object.__setattr__(self, 'b', 2 * self.a)\n"
    ),
    "init off, default": "    a: int\n    b: int = field(init=False, default=7)\n",
    "init off, factory": "    a: int\n    b: list = field(init=False, default_factory=list)\n",
    "own repr": "    a: float\n    def __repr__(self):\n        return f'<{self.a}>'\n",
    "own eq (hash from the fields)": (
        "    a: float\n    def __eq__(self, other):\n"
        "        return type(other) is type(self) and abs(self.a - other.a) < 0.5\n"
    ),
    "own hash": "    a: float\n    def __hash__(self):\n        return 42\n",
    "keyword-only": "    a: float\n    _: KW_ONLY\n    b: int = 0\n",
}

#: Field values tried on every class of :data:`BODIES` (missing ones defaulted).
VALUES: list[dict[str, Any]] = [
    {"a": 1, "b": "x"},
    {"a": 1, "b": "y"},
    {"a": 2, "b": "x"},
    {"a": math.nan, "b": "x"},
    {"a": -0.0, "b": "x"},
    {"a": 0.0, "b": "x"},
]


def _twins(body: str) -> tuple[type, type]:
    """(record, frozen dataclass) made from the same body."""
    made = []
    for deco in (record(frozen=True), dataclasses.dataclass(frozen=True)):
        ns: dict[str, Any] = {}
        names = {"field": dataclasses.field, "ClassVar": ClassVar, "InitVar": dataclasses.InitVar}
        # the body as written, its annotations evaluated (not this module's postponed ones)
        code = compile(f"class C:\n{body}", "<body>", "exec", dont_inherit=True)
        exec(code, {**names, "KW_ONLY": dataclasses.KW_ONLY}, ns)
        made.append(deco(ns["C"]))
    return made[0], made[1]


def _make(cls: type, values: dict[str, Any]) -> Any:
    fields = {f.name: f for f in dataclasses.fields(cls) if f.init}
    kept = {k: v for k, v in values.items() if k in fields}
    if "b" in kept and fields["b"].type not in ("str", str):
        kept["b"] = len(kept["b"])  # an int field: a value derived from the text
    return cls(**kept)


@pytest.mark.parametrize("body", BODIES.values(), ids=BODIES.keys())
def test_a_record_behaves_as_the_frozen_dataclass(body):
    rec_cls, std_cls = _twins(body)
    assert dataclasses.is_dataclass(rec_cls)
    assert [f.name for f in dataclasses.fields(rec_cls)] == [f.name for f in dataclasses.fields(std_cls)]
    assert rec_cls.__match_args__ == std_cls.__match_args__
    recs = [_make(rec_cls, v) for v in VALUES]
    stds = [_make(std_cls, v) for v in VALUES]
    for r, s in zip(recs, stds, strict=True):
        assert repr(r) == repr(s)
        if not _holds_nan(s):  # a NaN made in __post_init__ is a new object in each twin: hash(nan) is its id
            assert _hash_or_error(r) == _hash_or_error(s)
        assert repr(dataclasses.asdict(r)) == repr(dataclasses.asdict(s))  # NaN made anew in each twin
        assert repr(dataclasses.replace(r)) == repr(dataclasses.replace(s))
        for again in (copy.copy(r), copy.deepcopy(r)):
            assert again == r or again != again  # NaN fields are unequal, as the standard library's
            assert repr(again) == repr(r)
    for i, (r1, s1) in enumerate(zip(recs, stds, strict=True)):
        for r2, s2 in zip(recs[i:], stds[i:], strict=True):
            assert (r1 == r2) is (s1 == s2), (r1, r2)
            assert (r1 != r2) is (s1 != s2), (r1, r2)
    if "__eq__" not in body:  # the generated equality leaves other classes to them
        assert recs[0].__eq__(stds[0]) is NotImplemented and stds[0].__eq__(recs[0]) is NotImplemented


@pytest.mark.parametrize("body", BODIES.values(), ids=BODIES.keys())
def test_a_record_is_frozen_with_the_standard_message(body):
    rec_cls, std_cls = _twins(body)
    r, s = _make(rec_cls, VALUES[0]), _make(std_cls, VALUES[0])
    for name in [*std_cls.__dataclass_fields__, "not_a_field"]:  # ClassVar and InitVar names too
        with pytest.raises(dataclasses.FrozenInstanceError) as got:
            setattr(r, name, 5)
        with pytest.raises(dataclasses.FrozenInstanceError) as want:
            setattr(s, name, 5)
        assert str(got.value) == str(want.value)
        with pytest.raises(dataclasses.FrozenInstanceError) as got:
            delattr(r, name)
        with pytest.raises(dataclasses.FrozenInstanceError) as want:
            delattr(s, name)
        assert str(got.value) == str(want.value)
    assert repr(r) == repr(s)  # nothing changed


@record(frozen=True)
class _Stored:
    a: float
    b: tuple[str, ...] = ()


def test_a_record_pickles_and_copies():
    r = _Stored(1.5, ("x",))
    for again in (pickle.loads(pickle.dumps(r)), copy.copy(r), copy.deepcopy(r)):
        assert again == r and hash(again) == hash(r) and repr(again) == "_Stored(a=1.5, b=('x',))"
        with pytest.raises(dataclasses.FrozenInstanceError):
            again.a = 2.0  # type: ignore[misc]


def test_a_record_that_shows_itself_again_prints_dots():
    rec_cls, std_cls = _twins("    items: list\n")
    r, s = rec_cls([]), std_cls([])
    r.items.append(r)
    s.items.append(s)
    assert repr(r) == repr(s) == "C(items=[...])"


def test_post_init_cannot_assign_as_in_the_standard_library():
    """``self.b = ...`` in ``__post_init__`` (a field set by ``__init__``, one
    with ``init=False``, an ``InitVar``) raises in both."""
    for body in (
        "    a: int\n    b: int = 0\n    def __post_init__(self):\n        self.b = 1\n",
        "    a: int\n    b: int = field(init=False, default=0)\n    def __post_init__(self):\n        self.b = 1\n",
        "    a: int\n    s: InitVar[int] = 0\n    def __post_init__(self, s):\n        self.s = s\n",
    ):
        for cls in _twins(body):
            with pytest.raises(dataclasses.FrozenInstanceError, match="cannot assign to field"):
                cls(1)


def test_a_plain_subclass_keeps_its_own_attributes_as_in_the_standard_library():
    rec_cls, std_cls = _twins("    a: float\n")
    made = []
    for base in (rec_cls, std_cls):

        class Noted(base):  # type: ignore[valid-type,misc]
            def __init__(self, a: float, note: str) -> None:
                super().__init__(a)
                self.note = note

        obj = Noted(1.0, "checked")
        with pytest.raises(dataclasses.FrozenInstanceError, match="cannot assign to field 'a'"):
            obj.a = 2.0
        del obj.note
        obj.note = "again"
        made.append((repr(obj), vars(obj)))
    assert made[0] == made[1]


def test_what_a_record_refuses_when_the_class_is_defined():
    """The differences from the standard library are said at once: a record
    is frozen, defines no __setattr__ or __delattr__ (refused there too, with
    the same message), no __slots__, and holds no descriptor or slot fields."""

    def make(body: dict[str, Any], **kw: Any) -> type:
        return record(**kw)(type("M", (), {"__annotations__": {"a": "float"}, **body}))

    with pytest.raises(TypeError, match="is frozen"):
        make({}, frozen=False)
    for name in ("__setattr__", "__delattr__"):
        with pytest.raises(TypeError, match=f"Cannot overwrite attribute {name} in class M"):
            make({name: lambda *a: None}, frozen=True)
        with pytest.raises(TypeError, match=f"Cannot overwrite attribute {name} in class M"):
            dataclasses.dataclass(frozen=True)(
                type("M", (), {"__annotations__": {"a": "float"}, name: lambda *a: None})
            )
    with pytest.raises(TypeError, match="__slots__"):
        make({"__slots__": ("a",)}, frozen=True)
    with pytest.raises(TypeError, match="descriptor or a slot"):
        make({"a": property(lambda self: 1.0, lambda self, v: None)}, frozen=True)
    with pytest.raises(TypeError):
        record(frozen=True, order=True)  # type: ignore[call-overload]


def test_dxfcheck_mixes_no_record_with_a_standard_dataclass():
    """Records and the standard library's dataclasses stay in separate
    hierarchies (see :mod:`dxfcheck.core.records`)."""
    import importlib
    import inspect
    import pkgutil

    import dxfcheck

    classes = []
    for info in pkgutil.walk_packages(dxfcheck.__path__, "dxfcheck."):
        if not info.name.endswith("__main__"):
            classes += [c for _, c in inspect.getmembers(importlib.import_module(info.name), inspect.isclass)]
    records = {c for c in classes if "__record_settable__" in c.__dict__}
    assert len(records) >= 90  # the model's value types
    for c in classes:
        dataclass_bases = [b for b in c.__mro__[1:] if dataclasses.is_dataclass(b)]
        if c in records:
            assert all(b in records for b in dataclass_bases), c
        elif dataclasses.is_dataclass(c) and "__dataclass_fields__" in c.__dict__:
            assert not any(b in records for b in dataclass_bases), c


def _records_in(obj: Any, seen: set[int]) -> Iterator[Any]:
    """Every record reachable from ``obj`` (through records, tuples, lists,
    sets and dicts), each once."""
    if id(obj) in seen:
        return
    seen.add(id(obj))
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        if hasattr(type(obj), "__record_compared__"):
            yield obj
        for f in dataclasses.fields(obj):
            yield from _records_in(getattr(obj, f.name), seen)
    elif isinstance(obj, (tuple, list, set, frozenset)):
        for x in obj:
            yield from _records_in(x, seen)
    elif isinstance(obj, dict):
        for k, v in obj.items():
            yield from _records_in(k, seen)
            yield from _records_in(v, seen)


def _standard_twin(obj: Any) -> Any:
    """The standard library's frozen dataclass with ``obj``'s class's fields,
    made with ``obj``'s values."""
    cls = type(obj)
    fields = [
        (f.name, f.type, dataclasses.field(repr=f.repr, compare=f.compare, hash=f.hash, init=f.init))
        for f in dataclasses.fields(cls)
    ]
    twin = dataclasses.make_dataclass(cls.__name__, fields, frozen=True)
    twin.__qualname__ = cls.__qualname__
    made = twin(**{f.name: getattr(obj, f.name) for f in dataclasses.fields(cls) if f.init})
    for f in dataclasses.fields(cls):
        object.__setattr__(made, f.name, getattr(obj, f.name))
    return made


def _holds_nan(obj: Any) -> bool:
    return any(isinstance(v, float) and math.isnan(v) for v in vars(obj).values())


def _hash_or_error(obj: Any) -> int | str:
    try:
        return hash(obj)
    except TypeError as exc:
        return str(exc)


def _every_record(folder: Path) -> list[Any]:
    import dxfcheck

    seen: set[int] = set()
    found: list[Any] = []
    for path in sorted((ROOT / "drawings").glob("*.dxf")):
        found.extend(_records_in(dxfcheck.check(path), seen))
    for k, (build, mu) in enumerate(CATALOGUE.values()):
        path = folder / f"c{k}.dxf"
        build().save(path)
        found.extend(_records_in(dxfcheck.analyse(path, mu=mu), seen))
    return found


def test_every_record_in_the_solutions_matches_its_standard_twin(tmp_path):
    """repr, hash, equality and the frozen fields of every record instance a
    check of the demos and a solve of the catalogue brakes hold (the
    drawings, mechanisms, contacts, results, rules and findings)."""
    found = _every_record(tmp_path)
    kinds = {type(r).__qualname__ for r in found}
    assert len(kinds) >= 30, sorted(kinds)  # the model's types, not a handful
    for r in found:
        twin = _standard_twin(r)
        assert repr(r) == repr(twin), type(r)
        assert _hash_or_error(r) == _hash_or_error(twin), type(r)  # a dict field: unhashable in both
        assert r == dataclasses.replace(r) or r != r  # a NaN field is unequal, as in the standard library
        name = dataclasses.fields(r)[0].name if dataclasses.fields(r) else "x"
        with pytest.raises(dataclasses.FrozenInstanceError):
            setattr(r, name, None)
