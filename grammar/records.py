"""Dataclasses that cost less to define: ``@record`` is ``@dataclass``.

Python's ``dataclass`` writes the source of every method it adds
(``__init__``, ``__repr__``, ``__eq__``, ``__hash__``, and for a frozen
class ``__setattr__`` and ``__delattr__``) and compiles each one when the
class is defined: a third of a millisecond for a frozen class, paid on
every start for the few dozen classes of the model, the findings and the
workspace (``tests/test_cold_start.py``'s path).  ``record`` lets
``dataclass`` read the fields (so ``dataclasses.fields``, ``replace`` and
``asdict`` work as usual), compiles only ``__init__``, and gives the other
methods as small closures over the field names that do what the generated
ones do: equality and ordering compare the tuples of the compared fields of
two instances of the same class, the hash is that of the tuple of the hashed
fields, the repr lists the fields shown, and a frozen class refuses to set
or delete its fields.  ``tests/test_records.py`` holds both side by side.

Supported: defaults, ``field(default_factory=..., compare=..., hash=...,
repr=...)``, ``frozen`` and ``order``.  Not supported (a TypeError says so):
``__post_init__``, ``ClassVar``, ``InitVar``, keyword-only or ``init=False``
fields, and a class that defines one of the methods itself.
"""
from __future__ import annotations

import dataclasses
import reprlib
from dataclasses import MISSING, FrozenInstanceError
from operator import attrgetter

_METHODS = ("__init__", "__repr__", "__eq__", "__hash__", "__setattr__", "__delattr__",
            "__lt__", "__le__", "__gt__", "__ge__")
_FACTORY = object()  # the default of a field with a default_factory: "call the factory"


def record(cls=None, *, frozen: bool = False, order: bool = False):
    """``@dataclass`` (``frozen``, ``order``) without compiling more than ``__init__``."""
    if cls is None:
        return lambda c: _make(c, frozen, order)
    return _make(cls, frozen, order)


def _make(cls, frozen: bool, order: bool):
    mine = [name for name in _METHODS if name in cls.__dict__]
    if mine or "__post_init__" in cls.__dict__:
        raise TypeError(f"record {cls.__name__}: defines {', '.join(mine) or '__post_init__'} itself; use @dataclass")
    cls = dataclasses.dataclass(init=False, repr=False, eq=False)(cls)
    fields = dataclasses.fields(cls)
    if len(fields) != len(cls.__dataclass_fields__) or any(f.kw_only is True or not f.init for f in fields):
        raise TypeError(f"record {cls.__name__}: ClassVar, InitVar, keyword-only and init=False fields need "
                        "@dataclass")
    cls.__init__ = _init(cls, fields)
    key = _getter([f.name for f in fields if f.compare])
    hash_key = _getter([f.name for f in fields if (f.compare if f.hash is None else f.hash)])
    shown = tuple(f.name for f in fields if f.repr)

    def __eq__(self, other):
        if other.__class__ is self.__class__:
            return key(self) == key(other)
        return NotImplemented

    @reprlib.recursive_repr()
    def __repr__(self):
        return self.__class__.__qualname__ + "(" + ", ".join(f"{n}={getattr(self, n)!r}" for n in shown) + ")"

    cls.__eq__ = __eq__
    cls.__repr__ = __repr__
    if frozen:
        names = frozenset(f.name for f in fields)

        def __hash__(self):
            return hash(hash_key(self))

        def __setattr__(self, name, value):
            if type(self) is cls or name in names:
                raise FrozenInstanceError(f"cannot assign to field {name!r}")
            super(cls, self).__setattr__(name, value)

        def __delattr__(self, name):
            if type(self) is cls or name in names:
                raise FrozenInstanceError(f"cannot delete field {name!r}")
            super(cls, self).__delattr__(name)

        cls.__hash__ = __hash__
        cls.__setattr__ = __setattr__
        cls.__delattr__ = __delattr__
    else:
        cls.__hash__ = None  # as dataclass: equal by value and mutable, so not hashable
    if order:
        for name, compare in (("__lt__", tuple.__lt__), ("__le__", tuple.__le__), ("__gt__", tuple.__gt__),
                              ("__ge__", tuple.__ge__)):
            setattr(cls, name, _ordering(name, compare, key))
    for name in _METHODS:
        fn = cls.__dict__.get(name)
        if fn is not None and hasattr(fn, "__qualname__"):
            fn.__qualname__ = f"{cls.__qualname__}.{name}"
    return cls


def _getter(names: list[str]):
    """The tuple of these attributes of an instance (always a tuple, as the
    generated methods compare and hash tuples)."""
    if len(names) > 1:
        return attrgetter(*names)
    if len(names) == 1:
        one = attrgetter(names[0])
        return lambda obj: (one(obj),)
    return lambda obj: ()


def _ordering(name: str, compare, key):
    def method(self, other):
        if other.__class__ is self.__class__:
            return compare(key(self), key(other))
        return NotImplemented

    method.__name__ = name
    return method


def _init(cls, fields):
    """The one compiled method: the fields as parameters, in order, with
    their defaults; a default_factory is called when its field is not given."""
    scope = {"_set": object.__setattr__, "_FACTORY": _FACTORY}
    params, body = [], []
    for i, f in enumerate(fields):
        arg = f.name
        if f.default is not MISSING:
            scope[f"_default_{i}"] = f.default
            params.append(f"{arg}=_default_{i}")
            body.append(f"    _set(self, {arg!r}, {arg})")
        elif f.default_factory is not MISSING:
            scope[f"_factory_{i}"] = f.default_factory
            params.append(f"{arg}=_FACTORY")
            body.append(f"    _set(self, {arg!r}, _factory_{i}() if {arg} is _FACTORY else {arg})")
        else:
            params.append(arg)
            body.append(f"    _set(self, {arg!r}, {arg})")
    source = f"def __init__(self, {', '.join(params)}):\n" + ("\n".join(body) or "    pass") + "\n"
    exec(source, scope)
    init = scope["__init__"]
    init.__qualname__ = f"{cls.__qualname__}.__init__"
    init.__module__ = cls.__module__
    return init
