"""Output formats for an evaluated link."""
