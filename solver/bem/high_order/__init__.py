"""High-order Nystrom solver for conductors in a homogeneous medium (exact curves, product integration)."""
