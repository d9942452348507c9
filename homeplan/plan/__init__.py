"""The plan file format: the model (pydantic), safe loading with line and column for every
problem, atomic saving that keeps comments, migration of older formats, the JSON Schema, the
content hash and the fuel vocabulary.

Modules: ``model``, ``load``, ``save``, ``migrate``, ``checks`` (rules across fields),
``schema``, ``hashing``, ``fuels``.
"""

__all__: list[str] = []
