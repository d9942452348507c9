"""Modal screens: forms, confirmations, details."""

__all__: list[str] = []
