"""Errors raised by the engine.

Every rejection of user input is a :class:`ScenarioError` that names the
offending field as a dotted path (``"pool.size"``, ``"compare.1.skip"``) and
says, in plain words, what was given and what range is allowed.  The command
line and the page show exactly this message.
"""

from __future__ import annotations

__all__ = ["ScenarioError"]


class ScenarioError(ValueError):
    """Invalid scenario or request.

    Attributes
    ----------
    field:
        Dotted path of the offending field (``""`` for the whole document).
    message:
        What is wrong and the allowed range, in plain words.
    """

    def __init__(self, field: str, message: str) -> None:
        super().__init__(f"{field}: {message}" if field else message)
        self.field = field
        self.message = message

    def to_dict(self) -> dict[str, str]:
        return {"field": self.field, "message": self.message}
