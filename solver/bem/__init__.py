"""The boundary-element system: panel integrals, assembly, the solve driver and the Solution."""
