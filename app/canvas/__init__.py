"""The drawing canvas: sketching tools, the drawing and the result overlays on it."""
