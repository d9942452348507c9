"""homeplan: plan a whole-home electrification as an ordered, costed, year-by-year roadmap."""

__version__ = "0.1.0"
