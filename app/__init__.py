"""Edgewise desktop program: sketch a cross-section, solve it, read charge, field and capacitance.

The Qt-free core (:mod:`app.document`, :mod:`app.edits`, :mod:`app.shapes`, :mod:`app.cautions`)
holds the document and its edits; the Qt modules draw it and call :mod:`solver` for every number.
"""

from . import refcount_guard as _refcount_guard

_refcount_guard.top_up()
