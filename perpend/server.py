"""Kernel websockets that send small messages at once (TCP_NODELAY).

JupyterLab's server forwards each kernel message to the browser's websocket as it arrives. A
kernel answers every request with a few small messages (status busy, the reply, status idle).
tornado leaves Nagle's algorithm on for websockets by default, so the second small message waits
until the browser acknowledges the first, and Linux delays that acknowledgement by up to 40 ms.
Measured from Node against JupyterLab 4.6.4's server (jupyter_server 2.21, ipykernel 7.4) on the
same machine: every request took 43-53 ms (a read of an unchanged 8 MB array, a sample rate, even
an ``execute_request`` of ``pass``), of which the kernel spent 3 ms; with TCP_NODELAY on the
kernel websocket, 2.5-10 ms. tornado's documentation of ``WebSocketHandler.set_nodelay``
recommends it for exactly this case (small messages whose delay matters).

Only the kernel websockets are changed; nothing else of the server is touched. If the server's
handler is not where jupyter_server 2 keeps it, nothing is changed and a warning says so.
"""

import functools
import inspect

_MARK = "_perpend_nodelay"


def nodelay_kernel_websockets(log=None):
    """Makes every kernel websocket opened from now on send without Nagle's delay.

    Returns True when the handler is (or already was) changed, False when it could not be found.
    """
    try:
        from jupyter_server.services.kernels.websocket import KernelWebsocketHandler
    except Exception as e:  # another server, or a future layout: leave it as it is
        if log is not None:
            log.warning("Perpend: kernel websockets left as they are (%s)", e)
        return False
    original = KernelWebsocketHandler.open
    if getattr(original, _MARK, False):
        return True

    @functools.wraps(original)
    async def open(self, *args, **kwargs):
        try:
            self.set_nodelay(True)
        except Exception:  # a connection closed meanwhile: nothing to change
            pass
        result = original(self, *args, **kwargs)
        if inspect.isawaitable(result):
            result = await result
        return result

    setattr(open, _MARK, True)
    KernelWebsocketHandler.open = open
    return True
