"""Topology of a mechanism: its graph, mobility, loops, link types and chain class.

The mechanism is a multigraph with one node per link and one edge per joint
(:func:`link_graph`).  From it come the Gruebler-Kutzbach mobility, the
number of independent loops, the link degrees (binary, ternary, ...), and for
six-bar and the two indeterminate eight-bar chains, the chain class by graph
isomorphism.  :func:`summarise_topology` adds the numerical mobility (the rank
of the velocity constraints at this position) and says in words where the two
counts differ.

Six-bar naming convention
-------------------------
Texts number the inversions differently.  mechgraph names the ground link's
role explicitly and adds the number under this convention (recalled from
Uicker, Pennock & Shigley, *Theory of Machines and Mechanisms*; from memory):

* Watt chain (the two ternary links joined directly):
  Watt I, ground is a binary link; Watt II, ground is a ternary link (two
  four-bars in series).
* Stephenson chain (the ternary links not joined directly):
  Stephenson I, ground is a binary link joined to both ternary links;
  Stephenson II, ground is a binary link joined to one ternary link;
  Stephenson III, ground is a ternary link.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import networkx as nx

from .model import Mechanism

__all__ = ["Topology", "link_graph", "summarise_topology", "classify_chain", "DEGREE_NAMES"]

#: Names of link types by number of joints.
DEGREE_NAMES = {1: "unary", 2: "binary", 3: "ternary", 4: "quaternary", 5: "pentagonal", 6: "hexagonal"}


def link_graph(mech: Mechanism) -> nx.MultiGraph:
    """The mechanism as a multigraph: links are nodes, joints are edges (keyed by joint name).

    Parameters
    ----------
    mech : Mechanism
        The mechanism.

    Returns
    -------
    networkx.MultiGraph
        Nodes carry ``ground`` (bool); edges carry ``kind`` and ``freedoms``
        of their joint.  Two joints between one pair are two parallel edges.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> g = link_graph(demo_mechanism())
    >>> g.number_of_nodes(), g.number_of_edges()
    (6, 7)

    Notes
    -----
    O(n + j) for n links and j joints.

    References
    ----------
    The graph of a kinematic chain (links as vertices, joints as edges):
    common practice, no single source.
    """
    g = nx.MultiGraph()
    for link in mech.links:
        g.add_node(link.name, ground=link.ground)
    for j in mech.joints:
        g.add_edge(j.links[0], j.links[1], key=j.name, kind=j.kind, freedoms=j.freedoms)
    return g


def _template(edges, ground_roles):
    """A chain template: its simple graph and the inversion named for each ground node."""
    g = nx.Graph()
    g.add_edges_from(edges)
    return g, ground_roles


@lru_cache(maxsize=1)
def _templates():
    """Chain templates: (graph, {node: (inversion name, ground role)})."""
    watt = _template(
        [("T1", "T2"), ("T1", "B1"), ("B1", "B2"), ("B2", "T2"), ("T1", "B3"), ("B3", "B4"), ("B4", "T2")],
        {"B1": ("Watt I", "a binary link"), "T1": ("Watt II", "a ternary link")},
    )
    steph = _template(
        [("T1", "B1"), ("B1", "T2"), ("T1", "B2"), ("B2", "T2"), ("T1", "B3"), ("B3", "B4"), ("B4", "T2")],
        {
            "B1": ("Stephenson I", "a binary link joined to both ternary links"),
            "B3": ("Stephenson II", "a binary link joined to one ternary link"),
            "T1": ("Stephenson III", "a ternary link"),
        },
    )
    butterfly = _template(
        [("T1", "T2"), ("T3", "T4"), ("T1", "B1"), ("B1", "T3"), ("T1", "B2"), ("B2", "T4"),
         ("T2", "B3"), ("B3", "T3"), ("T2", "B4"), ("B4", "T4")],
        {},
    )
    flier = _template(
        [("L1", "L2"), ("L2", "L3"), ("L3", "L4"), ("L4", "L1"),
         ("F", "B1"), ("F", "B2"), ("F", "B3"), ("B1", "L1"), ("B2", "L2"), ("B3", "L3")],
        {},
    )
    return {"Watt": watt, "Stephenson": steph, "double butterfly": butterfly, "single flier": flier}


def classify_chain(mech: Mechanism) -> tuple[str | None, str | None, str | None]:
    """Chain class by graph isomorphism: (chain, inversion, ground role).

    Recognises the Watt and Stephenson six-bar chains (with the inversion
    named under the convention in this module's docstring) and the two
    indeterminate eight-bar chains, the double butterfly and the single flier.
    Only chains of revolute-like joints count (one edge per pair, no higher
    pairs); anything else gives ``(None, None, None)``.

    Parameters
    ----------
    mech : Mechanism
        The mechanism.

    Returns
    -------
    chain : str or None
        ``"Watt"``, ``"Stephenson"``, ``"double butterfly"`` or ``"single flier"``.
    inversion : str or None
        For a six-bar: ``"Watt I"``, ``"Watt II"``, ``"Stephenson I"``,
        ``"Stephenson II"`` or ``"Stephenson III"``.
    ground role : str or None
        The ground link's role in words, e.g. ``"a ternary link"``.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> classify_chain(demo_mechanism())
    ('Stephenson', 'Stephenson III', 'a ternary link')

    Notes
    -----
    One VF2 isomorphism test per template (graphs of six or eight nodes), and
    one per inversion with the ground node marked.

    References
    ----------
    Chain names: common practice, no single source; inversion numbers from
    memory (see the module docstring).  The indeterminate eight-bars: Di
    Gregorio, *ASME J. Mech. Des.* 130(4):042303, 2008.
    """
    g = link_graph(mech)
    simple = nx.Graph(g)
    if simple.number_of_edges() != g.number_of_edges() or any(j.freedoms != 1 for j in mech.joints):
        return None, None, None
    if mech.n_links not in (6, 8):
        return None, None, None
    for name, (tg, roles) in _templates().items():
        if tg.number_of_nodes() != simple.number_of_nodes() or not nx.is_isomorphic(tg, simple):
            continue
        for node, (inversion, role) in roles.items():
            marked = tg.copy()
            nx.set_node_attributes(marked, False, "ground")
            marked.nodes[node]["ground"] = True
            if nx.is_isomorphic(marked, simple, node_match=lambda a, b: a["ground"] == b["ground"]):
                return name, inversion, role
        return name, None, None
    return None, None, None


@dataclass(frozen=True)
class Topology:
    """Summary of a mechanism's structure.

    Attributes
    ----------
    n_links, n_joints : int
    j1, j2 : int
        One-freedom and two-freedom joints.
    gruebler : int
        Gruebler-Kutzbach mobility 3(n-1) - 2 j1 - j2.
    mobility : int or None
        Freedoms from the rank of the velocity constraints at this position.
    loops : int
        Independent loops, joints - links + 1.
    cycle_basis : tuple of tuple of str
        One set of independent loops, as link names.
    link_types : dict
        Link name -> number of joints on it.
    chain, inversion, ground_role : str or None
        From :func:`classify_chain`.
    notes : tuple of str
        Plain-words remarks (counted and numerical mobility differ, etc.).

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> t = summarise_topology(demo_mechanism())
    >>> t.n_links, t.n_joints, t.j1, t.j2, t.chain
    (6, 7, 7, 0, 'Stephenson')

    Notes
    -----
    Built by :func:`summarise_topology`; a frozen record.

    References
    ----------
    Gruebler-Kutzbach criterion, loop count and link types: common practice,
    no single source.
    """

    n_links: int
    n_joints: int
    j1: int
    j2: int
    gruebler: int
    mobility: int | None
    loops: int
    cycle_basis: tuple
    link_types: dict
    chain: str | None
    inversion: str | None
    ground_role: str | None
    notes: tuple

    def type_counts(self) -> dict[str, int]:
        """Number of links of each type, e.g. ``{"binary": 4, "ternary": 2}``.

        Returns
        -------
        dict of str to int
            Type name (see :data:`DEGREE_NAMES`; ``"<d>-joint"`` beyond six) ->
            number of links, in order of increasing joint count.

        Examples
        --------
        >>> from mechgraph.casefile import demo_mechanism
        >>> summarise_topology(demo_mechanism()).type_counts()
        {'binary': 4, 'ternary': 2}

        Notes
        -----
        One sort of the link degrees, O(n log n).

        References
        ----------
        Link types by number of joints: common practice, no single source.
        """
        out: dict[str, int] = {}
        for d in sorted(self.link_types.values()):
            key = DEGREE_NAMES.get(d, f"{d}-joint")
            out[key] = out.get(key, 0) + 1
        return out


def summarise_topology(mech: Mechanism, poses=None, *, rank_tol: float = 1e-9) -> Topology:
    """Graph facts of the mechanism and its mobility, counted and at this position.

    Parameters
    ----------
    mech : Mechanism
        The mechanism.
    poses : ndarray, optional
        Link poses for the numerical mobility; the case's own position by default.
    rank_tol : float, default 1e-9
        Rank threshold (see :func:`mechgraph.velocity.numerical_mobility`).

    Returns
    -------
    Topology
        Counts, loops, link types, chain class and remarks.

    Examples
    --------
    >>> from mechgraph.casefile import demo_mechanism
    >>> t = summarise_topology(demo_mechanism())
    >>> t.gruebler, t.mobility, t.loops, t.type_counts()
    (1, 1, 2, {'binary': 4, 'ternary': 2})

    Notes
    -----
    Graph work is linear in links and joints; the rank is one SVD, O(n^3).

    References
    ----------
    Gruebler-Kutzbach criterion and loop count L = j - n + 1: common practice,
    no single source.
    """
    from .velocity import gruebler_mobility, numerical_mobility

    g = link_graph(mech)
    j2 = sum(1 for j in mech.joints if j.freedoms == 2)
    j1 = len(mech.joints) - j2
    gm = gruebler_mobility(mech)
    nm, _ = numerical_mobility(mech, poses, rank_tol=rank_tol)
    loops = g.number_of_edges() - g.number_of_nodes() + nx.number_connected_components(g)
    basis = [tuple(c) for c in nx.cycle_basis(nx.Graph(g))]
    for a, b in nx.Graph(g).edges():
        extra = g.number_of_edges(a, b) - 1
        basis += [(a, b)] * extra
    chain, inversion, role = classify_chain(mech)
    notes = []
    if nm != gm:
        if nm > gm:
            notes.append(
                f"The Gruebler-Kutzbach count gives {gm} freedom(s), but at this position the velocity constraints "
                f"leave {nm}: some constraints are redundant (e.g. parallel, equal links) or the position is special "
                "(a change point). The numerical figure governs how many drivers are needed here."
            )
        else:
            notes.append(
                f"The Gruebler-Kutzbach count gives {gm} freedom(s), but the velocity constraints leave {nm} at this "
                "position."
            )
    if gm < 1 and nm < 1:
        notes.append("The mechanism has no freedom: it is a structure.")
    return Topology(
        n_links=mech.n_links,
        n_joints=len(mech.joints),
        j1=j1,
        j2=j2,
        gruebler=gm,
        mobility=nm,
        loops=loops,
        cycle_basis=tuple(basis),
        link_types={n: g.degree(n) for n in mech.link_names},
        chain=chain,
        inversion=inversion,
        ground_role=role,
        notes=tuple(notes),
    )
