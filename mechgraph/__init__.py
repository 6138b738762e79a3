"""mechgraph: relative instant centers of planar multi-loop mechanisms, cross-checked.

The pipeline reads as the modules do: a case file (:mod:`mechgraph.casefile`)
gives a :class:`~mechgraph.model.Mechanism` of links and joints
(:mod:`mechgraph.joints`); :mod:`mechgraph.topology` describes its graph;
:mod:`mechgraph.three_centers` finds every center the Aronhold-Kennedy theorem
reaches, on homogeneous points and lines (:mod:`mechgraph.projective`);
:mod:`mechgraph.velocity` solves the twists; :mod:`mechgraph.analysis` joins
them and :mod:`mechgraph.crosscheck` compares them; :mod:`mechgraph.report`
writes tables, JSON and CSV; :mod:`mechgraph.cli` is the command line.

Kinematic results only. Strength, guarding and safety follow local codes and
licensed engineering practice.
"""

from .analysis import Analysis, Center, analyse, locate_centers
from .casefile import demo_mechanism, load_case, parse_case
from .errors import (
    CaseFileError,
    DriverError,
    MechgraphError,
    ModelError,
    OutputError,
    SingularPositionError,
)
from .joints import CamContact, GearMesh, Joint, PinInSlot, Prismatic, Revolute, RollingContact
from .model import Driver, Link, Mechanism, PointOfInterest
from .topology import summarise_topology
from .velocity import analyse_velocities

__version__ = "0.1.0"

__all__ = [
    "Analysis",
    "Center",
    "analyse",
    "locate_centers",
    "demo_mechanism",
    "load_case",
    "parse_case",
    "CaseFileError",
    "DriverError",
    "MechgraphError",
    "ModelError",
    "OutputError",
    "SingularPositionError",
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
