"""Design studies: batched cases, sweeps with level boundaries, fin sizing,
sensitivities and uncertainty (issue 6)."""

__all__ = []
