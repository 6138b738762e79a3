"""The one exception family of mechgraph.

Every error the package raises on purpose derives from :class:`MechgraphError`.
Each message names the file, field, link or joint at fault and says what would
be valid, so the command line can print it as it is, without a traceback.
"""

from __future__ import annotations

__all__ = [
    "MechgraphError",
    "CaseFileError",
    "HandCheckError",
    "ModelError",
    "DriverError",
    "SingularPositionError",
    "AssemblyError",
    "RelaxationError",
    "IncompleteRelaxationError",
    "NumberKindError",
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


class HandCheckError(CaseFileError):
    """A hand file cannot be read or does not fit its case.

    The message names the file, the line (CSV) or the entry and field (TOML),
    and says what would be valid.  A subclass of :class:`CaseFileError`, so it
    is a bad input like any case-file error.
    """


class AssemblyError(MechgraphError):
    """Newton's method did not assemble the mechanism (the input is out of reach, or a branch point).

    Attributes
    ----------
    residual : float
        Largest residual after the last step: distances as a share of the
        drawing size, angles in radians.
    iterations : int
        Newton steps taken.
    """

    def __init__(self, message: str, *, residual: float, iterations: int):
        self.residual = residual
        self.iterations = iterations
        super().__init__(message)


class RelaxationError(MechgraphError):
    """The relaxation method cannot be applied as asked (names the link or joint at fault)."""


class IncompleteRelaxationError(RelaxationError):
    """Some centers were reached neither by the theorem nor by any relaxation.

    Attributes
    ----------
    pairs : tuple of str
        The pairs left, ``"link-link"``.
    """

    def __init__(self, message: str, *, pairs: tuple[str, ...] = ()):
        self.pairs = tuple(pairs)
        super().__init__(message)


class NumberKindError(MechgraphError):
    """A computation cannot be done in the chosen arithmetic (e.g. exact mode away from the drawn position)."""
