/**
 * The Python helper Perpend installs in the kernel, as text.
 *
 * It is executed silently (no history, no execution count) into a module of its own in
 * `sys.modules`, never into the user's namespace. It never evaluates anything it receives:
 * requests carry only validated names, integers and JSON data. Replies are JSON text (or
 * binary comm buffers) that the front end parses and validates; nothing is evaluated there
 * either.
 */

/** Bumped when the helper changes, so an old copy left in a kernel is replaced. */
export const HELPER_VERSION = 2;
/** Key of the helper module in `sys.modules`. */
export const HELPER_MODULE = `_perpend_bridge_${HELPER_VERSION}`;
/** Comm target the helper registers. */
export const COMM_TARGET = `perpend.bridge.${HELPER_VERSION}`;

const SOURCE = String.raw`
import sys, json, base64, keyword, unicodedata, builtins, types

VERSION = @@VERSION@@
TARGET = "@@TARGET@@"
LIMB = 2 ** 53
MAX_LIST = 10000000
MAX_LIST_LISTED = 200000

class Text(object):
    __slots__ = ("s",)
    def __init__(self, s):
        self.s = s
    def __repr__(self):
        return self.s
    def _repr_pretty_(self, p, cycle):
        p.text(self.s)

class Err(Exception):
    def __init__(self, code, **detail):
        Exception.__init__(self, code)
        self.code = code
        self.detail = detail

def shell():
    from IPython import get_ipython
    return get_ipython()

def valid_name(n):
    return (isinstance(n, str) and 0 < len(n) <= 200 and n == unicodedata.normalize("NFKC", n)
            and n.isidentifier() and not keyword.iskeyword(n))

def np_mod():
    return sys.modules.get("numpy")

PLAIN = (int, float, complex, bool)

def plain(x):
    # Exact built-in number types, or numpy's own scalars: nothing whose methods the user
    # wrote (a subclass's __float__ or an object's __array__ would run user code).
    t = type(x)
    return t in PLAIN or (t.__module__ == "numpy" and isinstance(x, np_mod().generic))

def plain_list(v, limit):
    if len(v) == 0 or len(v) > limit:
        return False
    if type(v[0]) in (list, tuple):
        total = 0
        for row in v:
            if type(row) not in (list, tuple) or len(row) == 0:
                return False
            total += len(row)
            if total > limit:
                return False
            for x in row:
                if not plain(x):
                    return False
        return True
    for x in v:
        if not plain(x):
            return False
    return True

def as_array(v, convert_lists, limit=MAX_LIST):
    np = np_mod()
    if type(v) in (list, tuple):
        if not convert_lists:
            return None
        if np is None:
            import numpy as np
        if not plain_list(v, limit):
            return None
        try:
            a = np.asarray(v)
        except Exception:
            return None
        if a.dtype.kind not in "biufc" or a.ndim == 0:
            return None
        return a
    if np is not None and isinstance(v, np.ndarray):
        # A subclass is read as its plain ndarray data, without calling its own methods.
        return v if type(v) is np.ndarray else np.asarray(v)
    return None

def info(v, convert_lists=True):
    a = as_array(v, convert_lists, MAX_LIST_LISTED)
    if a is None or a.ndim == 0 or a.dtype.kind not in "biufc":
        return None
    notes = []
    if type(v) in (list, tuple):
        notes.append("list" if type(v) is list else "tuple")
    elif type(v).__name__ != "ndarray" or type(v).__module__ != "numpy":
        notes.append("subclass")
    if a.dtype.byteorder == ">":
        notes.append("big-endian")
    readable = True
    if a.ndim > 2:
        readable = False
        notes.append("ndim")
    if a.size == 0:
        readable = False
        notes.append("empty")
    if a.dtype.kind == "f" and a.dtype.itemsize > 8 or a.dtype.kind == "c" and a.dtype.itemsize > 16:
        readable = False
        notes.append("extended")
    if a.dtype.kind in "iu" and a.dtype.itemsize == 8:
        notes.append("int64")
    return {"shape": [int(s) for s in a.shape], "dtype": str(a.dtype.name),
            "bytes": int(a.nbytes), "readable": readable, "notes": notes}

def reply(obj):
    return Text(json.dumps(obj, allow_nan=False, separators=(",", ":")))

def user_items():
    sh = shell()
    ns = sh.user_ns
    hidden = getattr(sh, "user_ns_hidden", {})
    for k in list(ns.keys()):
        if not isinstance(k, str) or k.startswith("_"):
            continue
        v = ns.get(k)
        if k in hidden and hidden[k] is v:
            continue
        yield k, v

def list_vars():
    out = []
    skipped = 0
    for k, v in user_items():
        if not valid_name(k):
            skipped += 1
            continue
        try:
            d = info(v)
        except Exception:
            d = None
        if d is not None:
            d["name"] = k
            out.append(d)
    return reply({"vars": out, "skipped": skipped})

def output_hist():
    return shell().history_manager.output_hist

def list_cells(counts):
    oh = output_hist()
    names = None
    out = []
    for n in counts:
        if not isinstance(n, int) or isinstance(n, bool):
            continue
        if n not in oh:
            out.append({"n": n, "found": False})
            continue
        v = oh[n]
        try:
            d = info(v)
        except Exception:
            d = None
        if d is None:
            out.append({"n": n, "found": True, "array": False})
            continue
        if names is None:
            names = list(user_items())
        d["same_as"] = [k for k, w in names if w is v and valid_name(k)][:3]
        d["n"] = n
        d["found"] = True
        d["array"] = True
        out.append(d)
    return reply({"cells": out})

HEX = "0123456789abcdef"

def verify_cells(claims):
    # claims: [[n, sha256 hex of a cell's source], ...]. For each, whether the raw input that
    # IPython stored as execution n has that digest (after rstrip("\n"), UTF-8). The history
    # is a list indexed by execution count; IPython skips storing a few inputs (exit, quit,
    # paste magics) while still counting them, so when its length is not the next count the
    # indexes cannot be trusted and nothing is verified.
    import hashlib
    sh = shell()
    hm = getattr(sh, "history_manager", None)
    hist = getattr(hm, "input_hist_raw", None)
    count = getattr(sh, "execution_count", None)
    if (hist is None or not isinstance(count, int) or isinstance(count, bool)
            or len(hist) != count):
        return reply({"aligned": False, "cells": []})
    out = []
    for c in claims:
        if not isinstance(c, list) or len(c) != 2:
            continue
        n, d = c
        if (not isinstance(n, int) or isinstance(n, bool) or not isinstance(d, str)
                or len(d) != 64 or any(ch not in HEX for ch in d)):
            continue
        if not 1 <= n < len(hist) or not isinstance(hist[n], str):
            out.append({"n": n, "d": d, "match": None})
            continue
        try:
            h = hashlib.sha256(hist[n].rstrip("\n").encode("utf-8")).hexdigest()
        except UnicodeError:
            h = None
        out.append({"n": n, "d": d, "match": h == d})
    return reply({"aligned": True, "cells": out})

def resolve(src):
    kind = src.get("kind") if isinstance(src, dict) else None
    if kind == "cell":
        n = src.get("n")
        if not isinstance(n, int) or isinstance(n, bool):
            raise Err("bad-request")
        oh = output_hist()
        if n not in oh:
            raise Err("not-in-cache", n=n)
        return oh[n]
    if kind == "variable":
        name = src.get("name")
        if not valid_name(name):
            raise Err("invalid-name")
        ns = shell().user_ns
        if name not in ns:
            raise Err("not-found")
        return ns[name]
    raise Err("bad-request")

def attr_path(ref):
    parts = ref if isinstance(ref, list) else None
    if not parts or len(parts) > 4 or not all(valid_name(p) for p in parts):
        raise Err("invalid-name")
    ns = shell().user_ns
    if parts[0] not in ns:
        raise Err("not-found")
    v = ns[parts[0]]
    for p in parts[1:]:
        if p.startswith("__"):
            raise Err("invalid-name")
        if not hasattr(v, p):
            raise Err("not-found")
        v = getattr(v, p)
    return v

def read_scalar(ref):
    try:
        return read_scalar_(ref)
    except Err as e:
        return reply({"error": e.code, "detail": e.detail})

def read_scalar_(ref):
    v = attr_path(ref)
    np = np_mod()
    if np is not None and isinstance(v, np.ndarray):
        if v.size != 1:
            raise Err("not-scalar", type="ndarray")
        v = v.reshape(-1)[0]
    if isinstance(v, bool) or (np is not None and isinstance(v, np.bool_)):
        raise Err("not-scalar", type="bool")
    try:
        import numbers
        if not isinstance(v, numbers.Real):
            raise Err("not-scalar", type=type(v).__name__[:40])
        x = float(v)
    except Err:
        raise
    except Exception:
        raise Err("not-scalar", type=type(v).__name__[:40])
    if x != x or x in (float("inf"), float("-inf")):
        raise Err("not-finite")
    return reply({"value": x})

def prepare(v, max_bytes):
    a = as_array(v, True)
    if a is None:
        np = np_mod()
        if np is not None and isinstance(v, (np.generic, int, float, complex)):
            raise Err("scalar")
        raise Err("not-array", type=type(v).__name__[:40])
    import numpy as np
    k = a.dtype.kind
    if k not in "biufc":
        raise Err("dtype", dtype=str(a.dtype.name)[:40])
    if k == "f" and a.dtype.itemsize > 8 or k == "c" and a.dtype.itemsize > 16:
        raise Err("extended", dtype=str(a.dtype.name))
    if a.ndim == 0:
        raise Err("scalar")
    if a.ndim > 2:
        raise Err("ndim", ndim=int(a.ndim), shape=[int(s) for s in a.shape])
    if a.size == 0:
        raise Err("empty", shape=[int(s) for s in a.shape])
    cplx = k == "c"
    out_bytes = int(a.size) * (16 if cplx else 8)
    if out_bytes > max_bytes:
        raise Err("too-large", bytes=out_bytes, max=max_bytes)
    if k in "iu" and a.dtype.itemsize == 8:
        bad = (a > LIMB) | (a < -LIMB) if k == "i" else (a > LIMB)
        if bad.any():
            i = int(np.flatnonzero(bad)[0])
            idx = [int(j) for j in np.unravel_index(i, a.shape)]
            raise Err("int-precision", index=idx, value=str(int(a[tuple(idx)])))
    b = np.ascontiguousarray(a, dtype="<c16" if cplx else "<f8")
    raw = b.reshape(-1).view(np.uint8)
    return {"shape": [int(s) for s in a.shape], "dtype": str(a.dtype.name), "complex": cplx,
            "nbytes": int(raw.size)}, raw

def check_name(name):
    if not valid_name(name):
        raise Err("invalid-name")
    ns = shell().user_ns
    out = {"exists": False, "module": None, "builtin": hasattr(builtins, name), "type": None}
    if name in ns:
        v = ns[name]
        out["exists"] = True
        out["type"] = type(v).__name__[:60]
        if isinstance(v, types.ModuleType):
            out["module"] = str(getattr(v, "__name__", name))[:100]
    return out

def conflicts(name, overwrite):
    c = check_name(name)
    if overwrite:
        return None, c
    if c["exists"] or c["builtin"]:
        return c, c
    return None, c

# ---- staged transfers (base64 path and comm writes) ----
stash = {}
writes = {}

def drop_old(d, keep):
    while len(d) > keep:
        d.pop(next(iter(d)))

def b64_open(h, src, max_bytes):
    try:
        head, raw = prepare(resolve(src), max_bytes)
    except Err as e:
        return reply({"error": e.code, "detail": e.detail})
    stash[h] = raw
    drop_old(stash, 4)
    return reply(head)

def b64_chunk(h, offset, size, close_if_last=False):
    raw = stash.get(h)
    if raw is None:
        return reply({"error": "stale"})
    text = base64.b64encode(raw[offset:offset + size].tobytes()).decode("ascii")
    if close_if_last and offset + size >= raw.size:
        stash.pop(h, None)
    return Text(text)

def b64_close(h):
    stash.pop(h, None)
    return reply({"closed": True})

def w_begin(h, name, shape, cplx, nbytes, overwrite):
    try:
        if not valid_name(name):
            raise Err("invalid-name")
        if (not isinstance(shape, list) or not 1 <= len(shape) <= 2
                or not all(isinstance(s, int) and s > 0 for s in shape)):
            raise Err("bad-request")
        import numpy as np
        n = 1
        for s in shape:
            n *= s
        if n * (16 if cplx else 8) != nbytes:
            raise Err("bad-request")
        c, _ = conflicts(name, overwrite)
        if c is not None:
            return reply({"conflict": c})
        writes[h] = {"name": name, "shape": shape, "cplx": bool(cplx),
                     "buf": np.empty(nbytes, np.uint8), "got": 0, "overwrite": overwrite}
        drop_old(writes, 4)
        return reply({"ok": True})
    except Err as e:
        return reply({"error": e.code, "detail": e.detail})

def w_put(h, offset, data):
    w = writes.get(h)
    if w is None:
        raise Err("stale")
    import numpy as np
    mv = np.frombuffer(data, np.uint8)
    if offset < 0 or offset + mv.size > w["buf"].size:
        raise Err("bad-request")
    w["buf"][offset:offset + mv.size] = mv
    w["got"] += mv.size

def w_chunk(h, offset, b64):
    try:
        w_put(h, offset, base64.b64decode(b64, validate=True))
        return reply({"ok": True})
    except Err as e:
        return reply({"error": e.code, "detail": e.detail})

def w_end(h):
    try:
        w = writes.pop(h, None)
        if w is None:
            raise Err("stale")
        if w["got"] != w["buf"].size:
            raise Err("incomplete", got=w["got"], expected=int(w["buf"].size))
        c, info_ = conflicts(w["name"], w["overwrite"])
        if c is not None:
            return reply({"conflict": c})
        arr = w["buf"].view("<c16" if w["cplx"] else "<f8").reshape(w["shape"])
        shell().user_ns[w["name"]] = arr
        return reply({"written": True, "was": info_})
    except Err as e:
        return reply({"error": e.code, "detail": e.detail})

def w_abort(h):
    writes.pop(h, None)
    return reply({"aborted": True})

# ---- comm path ----
comms = []

def on_msg(comm, msg):
    d = msg.get("content", {}).get("data") or {}
    req = d.get("req") if isinstance(d, dict) else None
    if not isinstance(req, int):
        return
    op = d.get("op")
    try:
        if op == "read":
            cs = int(d.get("chunk"))
            if not 65536 <= cs <= 64 * 1048576:
                raise Err("bad-request")
            head, raw = prepare(resolve(d.get("source")), int(d.get("max_bytes")))
            n = (raw.size + cs - 1) // cs
            head.update({"req": req, "op": "header", "chunks": n, "chunk": cs})
            comm.send(head)
            for i in range(n):
                o = i * cs
                comm.send({"req": req, "op": "chunk", "i": i, "offset": o},
                          buffers=[memoryview(raw[o:o + cs])])
            comm.send({"req": req, "op": "end"})
        elif op == "w-begin":
            r = json.loads(w_begin(req, d.get("name"), d.get("shape"), bool(d.get("complex")),
                                   d.get("nbytes"), bool(d.get("overwrite"))).s)
            r.update({"req": req, "op": "w-begun"})
            comm.send(r)
        elif op == "w-chunk":
            bufs = msg.get("buffers") or []
            if len(bufs) != 1:
                raise Err("bad-request")
            w_put(req, int(d.get("offset")), bufs[0])
        elif op == "w-end":
            r = json.loads(w_end(req).s)
            r.update({"req": req, "op": "w-ended"})
            comm.send(r)
        elif op == "w-abort":
            writes.pop(req, None)
        else:
            raise Err("bad-request")
    except Err as e:
        if op == "w-chunk":
            writes.pop(req, None)
        comm.send({"req": req, "op": "error", "code": e.code, "detail": e.detail})
    except KeyboardInterrupt:
        writes.pop(req, None)
        comm.send({"req": req, "op": "error", "code": "interrupted", "detail": {}})
    except MemoryError:
        writes.pop(req, None)
        comm.send({"req": req, "op": "error", "code": "memory", "detail": {}})
    except Exception as e:
        writes.pop(req, None)
        comm.send({"req": req, "op": "error", "code": "internal",
                   "detail": {"type": type(e).__name__[:40]}})

def on_open(comm, open_msg):
    comms.append(comm)
    del comms[:-8]
    comm.on_msg(lambda m: on_msg(comm, m))
    comm.send({"op": "ready", "version": VERSION})

def register():
    sh = shell()
    cm = None
    k = getattr(sh, "kernel", None)
    if k is not None:
        cm = getattr(k, "comm_manager", None)
    if cm is None:
        try:
            import comm as comm_pkg
            cm = comm_pkg.get_comm_manager()
        except Exception:
            cm = None
    if cm is not None:
        cm.register_target(TARGET, on_open)
        return True
    return False

HAS_COMM = register()
`;

/** The helper's source with its constants filled in. */
export function helperSource(): string {
  return SOURCE.replace('@@VERSION@@', String(HELPER_VERSION)).replace('@@TARGET@@', COMM_TARGET);
}

/**
 * Code for a silent execute that installs the helper module unless this version is already in
 * `sys.modules`. One expression statement: it binds no name in the user's namespace.
 */
export function installCode(): string {
  if (cachedInstall !== null) {
    return cachedInstall;
  }
  const src = JSON.stringify(helperSource());
  // JSON string syntax is a subset of Python's double-quoted literal syntax for these
  // characters (the source is ASCII), so the literal is exact.
  cachedInstall =
    `(lambda s, t: None if ${JSON.stringify(HELPER_MODULE)} in s.modules else ` +
    `(lambda m: (exec(${src}, m.__dict__), s.modules.__setitem__(${JSON.stringify(HELPER_MODULE)}, m)))` +
    `(t.ModuleType(${JSON.stringify(HELPER_MODULE)})))(__import__("sys"), __import__("types"))`;
  return cachedInstall;
}

let cachedInstall: string | null = null;

/** The expression that reaches the helper module from a user expression. */
export const HELPER_REF = `__import__("sys").modules[${JSON.stringify(HELPER_MODULE)}]`;
