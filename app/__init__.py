"""Edgewise desktop program: sketch a cross-section, solve it, read charge, field and capacitance.

Run ``python -m app [MODEL.json]`` (or the ``edgewise`` command); with no file it opens the
coaxial feeder sample, already solved.

Layout: drawing tools and Solve in the top tool bar, then what the drawing shows (shading,
equipotentials, field lines, surface charge, hot spots); parts list and properties on the left;
results on the right in tabs (Numbers, Charge along boundary, Probe line, High voltage, Limits
of 2-D; further sections register with ``ResultsPanel.add_section``); caution and error strips
above the drawing; cursor readout, solve progress and Cancel in the status bar.

The Qt-free core (:mod:`app.document`, :mod:`app.edits`, :mod:`app.jobs.results`,
:mod:`app.cautions`, :mod:`app.files.project_files`) holds the document and its edits; the Qt modules draw it
and call :mod:`solver` for every number.
"""
