"""Side panels and result views: properties, parts list, matrices, plots, hot spots, line figures."""
