/**
 * Python objects that record every call into them (`calls`), their metaclass's hooks included:
 * a lazy proxy with a class-level `__class__` property and a factory, a record with a property,
 * a getter that raises AttributeError, a method and `__getattr__`, a slotted object, a class
 * with its own `__getattribute__`, a float subclass with `__float__`, an ndarray subclass with
 * `__array_finalize__`, `__getitem__` and shape/dtype properties, numpy masked arrays.
 * Used by test/bridge/helper-rules.test.ts (the helper's source in a plain Python) and
 * test/integration/harden.test.ts (a real kernel). Ends with `calls.clear()`.
 */
export const RECORDING_OBJECTS = String.raw`
import numpy as np

calls = []

class Meta(type):
    # Metaclass hooks the helper could reach by comparing, hashing or asking a class.
    def __eq__(cls, other):
        calls.append("Meta.__eq__"); return type.__eq__(cls, other)
    def __hash__(cls):
        calls.append("Meta.__hash__"); return type.__hash__(cls)
    def __instancecheck__(cls, obj):
        calls.append("Meta.__instancecheck__"); return type.__instancecheck__(cls, obj)
    def __subclasscheck__(cls, sub):
        calls.append("Meta.__subclasscheck__"); return type.__subclasscheck__(cls, sub)
    def __getattribute__(cls, n):
        calls.append("Meta.__getattribute__ " + n); return type.__getattribute__(cls, n)

class Recorder(metaclass=Meta):
    # Every special method records its call, then behaves as object's would.
    def __getattr__(self, n):
        calls.append("__getattr__ " + n); raise AttributeError(n)
    def __float__(self):
        calls.append("__float__"); return 1.0
    def __index__(self):
        calls.append("__index__"); return 1
    def __int__(self):
        calls.append("__int__"); return 1
    def __array__(self, *a, **k):
        calls.append("__array__"); return np.zeros(3)
    def __len__(self):
        calls.append("__len__"); return 3
    def __iter__(self):
        calls.append("__iter__"); return iter([1.0, 2.0, 3.0])
    def __getitem__(self, i):
        calls.append("__getitem__"); return 1.0
    def __eq__(self, o):
        calls.append("__eq__"); return False
    def __hash__(self):
        calls.append("__hash__"); return 1
    def __bool__(self):
        calls.append("__bool__"); return True
    def __repr__(self):
        calls.append("__repr__"); return "Recorder()"

class LazyProxy(Recorder):
    # A lazy loader: its factory (reading a file, say) runs on first use; it claims to be
    # an ndarray through a class-level __class__ property.
    def __init__(self):
        object.__setattr__(self, "_factory", lambda: calls.append("factory") or np.arange(3.0))
    @property
    def __class__(self):
        calls.append("__class__ property"); return np.ndarray
    def __getattribute__(self, n):
        calls.append("__getattribute__ " + n); return object.__getattribute__(self, n)

class Rec(Recorder):
    cls_rate = 44100.0
    def __init__(self):
        self.__dict__["fs"] = 48000.0
    @property
    def rate(self):
        calls.append("rate getter"); return 8000.0
    @property
    def broken(self):
        calls.append("broken getter"); raise AttributeError("no such thing")
    def method(self):
        calls.append("method"); return 1.0

class Slotted(object):
    __slots__ = ("fs", "unset")
    def __init__(self):
        self.fs = 16000

class OwnGetattribute(object):
    def __getattribute__(self, n):
        calls.append("OwnGetattribute " + n); return 5.0

class FloatSub(float):
    def __float__(self):
        calls.append("FloatSub.__float__"); return 2.0
    def __eq__(self, o):
        calls.append("FloatSub.__eq__"); return False
    def __hash__(self):
        calls.append("FloatSub.__hash__"); return 1

class Sub(np.ndarray):
    def __array_finalize__(self, obj):
        calls.append("Sub.__array_finalize__")
    def __getitem__(self, i):
        calls.append("Sub.__getitem__"); return np.ndarray.__getitem__(self, i)
    def __array_wrap__(self, *a, **k):
        calls.append("Sub.__array_wrap__"); return a[0]
    def __array_ufunc__(self, *a, **k):
        calls.append("Sub.__array_ufunc__"); return NotImplemented
    def __array_function__(self, *a, **k):
        calls.append("Sub.__array_function__"); return NotImplemented
    @property
    def shape(self):
        calls.append("Sub.shape"); return (99,)
    @property
    def dtype(self):
        calls.append("Sub.dtype"); return np.dtype("int8")
    def reshape(self, *a, **k):
        calls.append("Sub.reshape"); return np.ndarray.reshape(self, *a, **k)
    def view(self, *a, **k):
        calls.append("Sub.view"); return np.ndarray.view(self, *a, **k)

class Cfg(object):
    fs = 22050.0
    @staticmethod
    def make():
        calls.append("Cfg.make"); return 1.0

class MetaCfg(metaclass=Meta):
    fs = 22050.0

rec = Rec()
slotted = Slotted()
own = OwnGetattribute()
lazy = LazyProxy()
fsub = FloatSub(48000.0)
sub = np.arange(4.0).view(Sub)
sub1 = np.array([96000.0]).view(Sub)
masked = np.ma.array([1.0, -999.0, 3.0], mask=[False, True, False])
unmasked = np.ma.array([1.0, 2.0])
calls.clear()
`;
