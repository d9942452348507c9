"""The views of a plan and the small widgets they use."""

__all__: list[str] = []
