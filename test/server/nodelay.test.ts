/**
 * The server extension (perpend/server.py): every kernel websocket opened after it loads turns
 * Nagle's algorithm off (TCP_NODELAY) before the server's own `open` runs. The reference for the
 * switch is tornado's documentation of `WebSocketHandler.set_nodelay` (tornado 6.5: "small
 * messages may be delayed and/or combined ... call self.set_nodelay(True) once the websocket
 * connection is established"); Nagle's algorithm is RFC 896, delayed acknowledgements RFC 1122
 * §4.2.3.2 (Linux's shortest delay, 40 ms, from memory). Run in the project's .venv against its
 * real jupyter_server (the handler's class and module as JupyterLab 4.6.4 installs them).
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';

const REPO = path.resolve(__dirname, '../..');
const PY = path.join(REPO, '.venv', 'bin', 'python');

function py(code: string): unknown {
  const r = spawnSync(PY, ['-c', code], { cwd: REPO, encoding: 'utf8' });
  if (r.status !== 0) {
    throw new Error(`python failed (${r.status}): ${r.stderr}`);
  }
  return JSON.parse(r.stdout.trim().split('\n').pop() ?? 'null');
}

const HEAD = `
import asyncio, json, sys
sys.path.insert(0, ${JSON.stringify(REPO)})
`;

test('a kernel websocket is switched to TCP_NODELAY first, then the server opens it as before', () => {
  const out = py(`${HEAD}
from jupyter_server.services.kernels.websocket import KernelWebsocketHandler
import perpend
from perpend.server import nodelay_kernel_websockets
original = KernelWebsocketHandler.open
class Log:
    lines = []
    def info(self, *a): self.lines.append(a[0] % a[1:])
    def warning(self, *a): self.lines.append(a[0] % a[1:])
class App:
    log = Log()
perpend._load_jupyter_server_extension(App())
wrapped = KernelWebsocketHandler.open
again = nodelay_kernel_websockets()
calls = []
h = KernelWebsocketHandler.__new__(KernelWebsocketHandler)
h.set_nodelay = lambda v: calls.append(["nodelay", v])
try:
    # the server's own open needs a whole server: on this bare handler it fails, after the switch
    asyncio.run(KernelWebsocketHandler.open(h, "kernel-id"))
    calls.append(["original", "returned"])
except Exception as e:
    calls.append(["original", type(e).__name__])
print(json.dumps({
    "points": perpend._jupyter_server_extension_points(),
    "changed": wrapped is not original,
    "again": again,
    "once": KernelWebsocketHandler.open is wrapped,
    "name": wrapped.__name__,
    "calls": calls,
    "log": App.log.lines,
}))
`) as Record<string, unknown>;
  expect(out.points).toEqual([{ module: 'perpend' }]);
  expect(out.changed).toBe(true);
  // a second load (two server apps in one process) does not wrap it twice
  expect(out.again).toBe(true);
  expect(out.once).toBe(true);
  expect(out.name).toBe('open');
  const calls = out.calls as [string, unknown][];
  expect(calls[0]).toEqual(['nodelay', true]);
  expect(calls[1][0]).toBe('original');
  expect(calls[1][1]).not.toBe('returned');
  expect(out.log).toEqual(['Perpend: kernel websockets send small messages at once (TCP_NODELAY)']);
});

test('a server without the handler where jupyter_server 2 keeps it is left alone, with a warning', () => {
  const out = py(`${HEAD}
sys.modules["jupyter_server.services.kernels.websocket"] = None  # as if it were not there
from perpend.server import nodelay_kernel_websockets
class Log:
    lines = []
    def warning(self, *a): self.lines.append(a[0] % a[1:])
print(json.dumps({"changed": nodelay_kernel_websockets(Log()), "log": Log.lines}))
`) as { changed: boolean; log: string[] };
  expect(out.changed).toBe(false);
  expect(out.log).toHaveLength(1);
  expect(out.log[0]).toMatch(/^Perpend: kernel websockets left as they are \(.*websocket/);
});
