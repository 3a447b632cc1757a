"""grammar/records.py: ``@record`` classes behave as the same classes under
``@dataclass``: construction, defaults and factories, equality, hashing,
ordering, repr, immutability, and the dataclasses functions."""
import copy
import dataclasses
import pickle
from dataclasses import field
from typing import Optional

import pytest

from deckward.grammar.findings import Span
from deckward.grammar.records import record


def _pair(frozen=False, order=False):
    """The same class body under both decorators."""
    def body():
        class Item:
            """An item."""

            name: str
            size: int = 3
            tags: list = field(default_factory=list)
            note: Optional[str] = field(default=None, compare=False)
            cached: tuple = field(default=(), repr=False, hash=False)

            def label(self) -> str:
                return f"{self.name}:{self.size}"

        return Item

    real = dataclasses.dataclass(frozen=frozen, order=order)(body())
    ours = record(frozen=frozen, order=order)(body())
    return real, ours


@pytest.mark.parametrize("frozen", [False, True])
def test_construction_equality_and_repr_match(frozen):
    real, ours = _pair(frozen=frozen)
    for args, kwargs in (((("a",), {})), (("a", 5), {"tags": [1]}), ((), {"name": "b", "note": "x", "cached": (1,)})):
        r, o = real(*args, **kwargs), ours(*args, **kwargs)
        assert repr(o).replace("Item", "X") == repr(r).replace("Item", "X")
        assert o.__dict__ == r.__dict__
        assert o.label() == r.label()
    assert ours("a", note="x") == ours("a", note="y")  # note is not compared
    assert ours("a") != ours("b") and ours("a") != real("a")  # another class is never equal
    assert ours("a").tags is not ours("a").tags  # a fresh list per instance
    with pytest.raises(TypeError):
        ours()
    with pytest.raises(TypeError):
        ours("a", 1, [], None, (), 9)
    assert [f.name for f in dataclasses.fields(ours)] == [f.name for f in dataclasses.fields(real)]
    assert ours.__match_args__ == real.__match_args__
    assert dataclasses.is_dataclass(ours)


def test_frozen_hash_and_immutability_match():
    real, ours = _pair(frozen=True)
    r, o = real("a", 2, (), "n", (9,)), ours("a", 2, (), "n", (9,))
    assert hash(o) == hash(r) == hash(("a", 2, ()))  # neither note (compare=False) nor cached (hash=False)
    for obj in (o, r):
        with pytest.raises(dataclasses.FrozenInstanceError, match="cannot assign to field 'size'"):
            obj.size = 4
        with pytest.raises(dataclasses.FrozenInstanceError, match="cannot delete field 'size'"):
            del obj.size
    assert dataclasses.replace(o, size=7) == ours("a", 7, (), "n", (9,))
    assert dataclasses.asdict(o) == dataclasses.asdict(r)
    assert pickle.loads(pickle.dumps(Span("x.deck", 1, 2, 1, 2, 1, 3))) == Span("x.deck", 1, 2, 1, 2, 1, 3)
    assert copy.deepcopy(o) == o


def test_a_mutable_record_is_unhashable_as_a_dataclass_is():
    real, ours = _pair(frozen=False)
    assert real.__hash__ is None and ours.__hash__ is None
    o = ours("a")
    o.size = 9
    assert o.size == 9


def test_ordering_matches():
    real, ours = _pair(frozen=True, order=True)
    pairs = [("a", 1), ("a", 2), ("b", 0)]
    for x in pairs:
        for y in pairs:
            for op in ("__lt__", "__le__", "__gt__", "__ge__"):
                assert getattr(ours(*x), op)(ours(*y)) == getattr(real(*x), op)(real(*y))
    assert ours("a").__lt__(real("a")) is NotImplemented
    assert sorted([Span("x.deck", 5, 6, 1, 6, 1, 7), Span("x.deck", 0, 1, 1, 1, 1, 2)])[0].start == 0


def test_a_recursive_repr_does_not_recurse():
    @record
    class Node:
        """A node."""

        child: object = None

    n = Node()
    n.child = n
    assert repr(n) == "test_a_recursive_repr_does_not_recurse.<locals>.Node(child=...)"


def test_what_record_does_not_do_is_refused():
    with pytest.raises(TypeError, match="defines __eq__"):
        @record
        class A:
            """A."""

            x: int

            def __eq__(self, other):
                return True

    with pytest.raises(TypeError, match="__post_init__"):
        @record
        class B:
            """B."""

            x: int

            def __post_init__(self):
                pass

    with pytest.raises(TypeError, match="keyword-only"):
        @record
        class C:
            """C."""

            x: int = field(kw_only=True)
