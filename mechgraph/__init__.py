"""mechgraph: relative instant centers of planar multi-loop mechanisms, cross-checked.

The pipeline reads as the modules do: a case file (:mod:`mechgraph.casefile`)
gives a :class:`~mechgraph.model.Mechanism` of links and joints
(:mod:`mechgraph.joints`); :mod:`mechgraph.topology` describes its graph;
:mod:`mechgraph.three_centers` finds every center the Aronhold-Kennedy theorem
reaches, on homogeneous points and lines (:mod:`mechgraph.projective`);
:mod:`mechgraph.velocity` solves the twists; :mod:`mechgraph.indeterminate`
locates what the theorem cannot reach by relaxation; :mod:`mechgraph.analysis`
joins them and :mod:`mechgraph.crosscheck` compares them, in any arithmetic of
:mod:`mechgraph.arithmetic`; :mod:`mechgraph.conditioning` says how far to
trust each center; :mod:`mechgraph.handcheck` checks a hand calculation;
:mod:`mechgraph.position` assembles other positions; :mod:`mechgraph.report`
writes tables, JSON and CSV; :mod:`mechgraph.cli` is the command line.

Kinematic results only. Strength, guarding and safety follow local codes and
licensed engineering practice.
"""

from .analysis import Analysis, Center, analyse, locate_centers
from .casefile import demo_mechanism, load_case, parse_case
from .errors import (
    AssemblyError,
    CaseFileError,
    DriverError,
    HandCheckError,
    IncompleteRelaxationError,
    MechgraphError,
    ModelError,
    NumberKindError,
    OutputError,
    RelaxationError,
    SingularPositionError,
)
from .joints import CamContact, GearMesh, Joint, PinInSlot, Prismatic, Revolute, RollingContact
from .model import Driver, Link, Mechanism, PointOfInterest
from .topology import summarise_topology
from .velocity import analyse_velocities
from .position import assemble
from .conditioning import assess
from .handcheck import check_hand, read_hand_file
from .indeterminate import locate_by_relaxation

__version__ = "0.1.0"

__all__ = [
    "Analysis",
    "Center",
    "analyse",
    "locate_centers",
    "demo_mechanism",
    "load_case",
    "parse_case",
    "AssemblyError",
    "CaseFileError",
    "DriverError",
    "HandCheckError",
    "IncompleteRelaxationError",
    "MechgraphError",
    "ModelError",
    "NumberKindError",
    "OutputError",
    "RelaxationError",
    "SingularPositionError",
    "assemble",
    "assess",
    "check_hand",
    "read_hand_file",
    "locate_by_relaxation",
    "CamContact",
    "GearMesh",
    "Joint",
    "PinInSlot",
    "Prismatic",
    "Revolute",
    "RollingContact",
    "Driver",
    "Link",
    "Mechanism",
    "PointOfInterest",
    "summarise_topology",
    "analyse_velocities",
]
