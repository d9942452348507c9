"""The terminal application (the only package that imports Textual)."""
