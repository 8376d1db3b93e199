"""Perpend: QR-based subspace tools and adaptive filters in a JupyterLab 4 panel.

The Python package carries the prebuilt front-end extension into
``share/jupyter/labextensions/perpend`` (all computation happens in the browser) and a small
server extension that makes the kernel websockets send small messages at once (``server.py``:
each request of the panel to the kernel waited about 40 ms for Nagle's algorithm).
"""

__version__ = "0.1.0"


def _jupyter_labextension_paths():
    return [{"src": "labextension", "dest": "perpend"}]


def _jupyter_server_extension_points():
    return [{"module": "perpend"}]


def _load_jupyter_server_extension(serverapp):
    from .server import nodelay_kernel_websockets

    if nodelay_kernel_websockets(serverapp.log):
        serverapp.log.info("Perpend: kernel websockets send small messages at once (TCP_NODELAY)")
