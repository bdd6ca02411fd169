"""Background work: the solve worker, figure jobs with progress and cancel, computed results."""
