"""The one exception family of mechgraph.

Every error the package raises on purpose derives from :class:`MechgraphError`.
Each message names the file, field, link or joint at fault and says what would
be valid, so the command line can print it as it is, without a traceback.
"""

from __future__ import annotations

__all__ = [
    "MechgraphError",
    "CaseFileError",
    "ModelError",
    "DriverError",
    "SingularPositionError",
    "OutputError",
]


class MechgraphError(Exception):
    """Root of every error mechgraph raises on purpose."""


class CaseFileError(MechgraphError):
    """A case file cannot be read: bad TOML, a missing or malformed field.

    Parameters
    ----------
    message : str
        What is wrong and what would be valid.
    path : str, optional
        The case file.
    line : int, optional
        The 1-based line number, where the TOML parser reports one.
    """

    def __init__(self, message: str, *, path: str | None = None, line: int | None = None):
        self.path = path
        self.line = line
        where = ""
        if path is not None:
            where = f"{path}"
            if line is not None:
                where += f", line {line}"
            where += ": "
        super().__init__(where + message)


class ModelError(MechgraphError):
    """The mechanism described is not a valid planar linkage (links, joints, points)."""


class DriverError(MechgraphError):
    """The drivers do not match the mechanism: wrong count, wrong joint kind, unknown joint."""


class SingularPositionError(MechgraphError):
    """The velocity equations are singular at this position (dead point, change point).

    Attributes
    ----------
    moving_links : tuple of str
        Links that can still move with every driver held still.
    joints : tuple of str
        Joints whose constraints are dependent at this position.
    """

    def __init__(self, message: str, *, moving_links: tuple[str, ...] = (), joints: tuple[str, ...] = ()):
        self.moving_links = tuple(moving_links)
        self.joints = tuple(joints)
        super().__init__(message)


class OutputError(MechgraphError):
    """An output file cannot be written (or would overwrite the input)."""
