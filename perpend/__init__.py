"""Perpend: QR-based subspace tools and adaptive filters in a JupyterLab 4 panel.

The Python package only carries the prebuilt front-end extension into
``share/jupyter/labextensions/perpend``; all computation happens in the browser.
"""

__version__ = "0.1.0"


def _jupyter_labextension_paths():
    return [{"src": "labextension", "dest": "perpend"}]
