"""The terminal application (the only package that imports Textual)."""

__all__: list[str] = []
