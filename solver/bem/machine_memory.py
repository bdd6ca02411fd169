"""How much memory this machine can give a solve, read once per call from the system."""

from __future__ import annotations

import os


def available_memory_bytes() -> int | None:
    """Memory the system can give without swapping (Linux MemAvailable), or None if unknown."""
    try:
        with open("/proc/meminfo") as f:
            for line in f:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    try:
        return int(os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE"))
    except (ValueError, OSError, AttributeError):
        return None


__all__ = ["available_memory_bytes"]
