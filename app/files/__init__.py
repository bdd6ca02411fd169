"""Project files (open, save, recent, recovery) and exports (CSV, JSON, PNG, SVG, PDF report)."""
