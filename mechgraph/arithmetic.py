"""Number kinds: floating point, exact, and high precision, behind one small interface.

The geometry (joints, the three-centers solver) and the velocity analysis are
written once and take an *arithmetic* object that supplies the numbers and the
few decisions that depend on them:

``num(x)``, ``trig_deg(deg)``, ``sqrt(x)``, ``place(local, pose)``, ``rotate(v, theta)``
    Numbers of this kind from the model's stored values.
``normalize_point``, ``normalize_line``, ``same_point``, ``lines_coincide``, ``separation``
    Canonical homogeneous representatives and the "is it zero" decisions:
    scale-free tolerances in floating point and high precision, exact zero in
    exact arithmetic.
``rank``, ``solve``, ``null_vector``
    The linear algebra of the velocity analysis.
``to_float``, ``text``
    Values for reports.

Three kinds:

* :class:`FloatArithmetic`, the default: IEEE doubles and numpy.
* :class:`ExactArithmetic`: exact numbers in the smallest sympy field that
  holds every input (the rationals, or an algebraic extension such as
  Q(sqrt 3) when directions are given in degrees).  Decimal inputs are taken
  as the exact decimals typed: ``37.2`` is ``372/10``.  Every zero test is
  exact.  It only works at the case's own position.
* :class:`PrecisionArithmetic`: mpmath numbers with a chosen number of
  significant digits, in a context of its own (no global state).

Decimal inputs: a float read from a case file remembers its text (see
:class:`TypedFloat`); a float built in code is taken as its shortest
round-trip decimal (``repr``), which is the decimal typed whenever it has at
most 15 significant digits.
"""

from __future__ import annotations

import math

import numpy as np

from . import projective as pg
from .errors import NumberKindError

__all__ = [
    "TypedFloat",
    "decimal_text",
    "FloatArithmetic",
    "ExactArithmetic",
    "PrecisionArithmetic",
    "FLOAT",
    "NumberKindError",
    "make_arithmetic",
    "KINDS",
]

#: Names of the arithmetics, as the command line takes them.
KINDS = ("float", "exact", "precision")


class TypedFloat(float):
    """A float that remembers the decimal text it was read from (for exact arithmetic).

    Examples
    --------
    >>> x = TypedFloat("37.20")
    >>> x == 37.2, x.text
    (True, '37.20')
    """

    __slots__ = ("text",)

    def __new__(cls, text: str):
        obj = super().__new__(cls, text)
        obj.text = text
        return obj


def decimal_text(x) -> str:
    """The exact decimal a stored number stands for: its typed text, else its shortest round-trip form.

    Examples
    --------
    >>> decimal_text(TypedFloat("1e-3")), decimal_text(0.1), decimal_text(7)
    ('1e-3', '0.1', '7')
    """
    text = getattr(x, "text", None)
    if text is not None:
        return text.replace("_", "")
    if isinstance(x, str):
        return x
    if isinstance(x, int):
        return str(x)
    return repr(float(x))


class FloatArithmetic:
    """IEEE double precision with scale-free tolerances (the default).

    Parameters
    ----------
    tol : float, default 1e-9
        Coincidence tolerance of points and lines (see
        :func:`mechgraph.projective.point_separation`).
    """

    name = "float"
    exact = False

    def __init__(self, tol: float = 1e-9):
        if not (tol > 0.0):
            raise ValueError(f"tol must be positive, got {tol!r}")
        self.tol = tol

    zero = 0.0
    one = 1.0

    # ---- numbers
    def num(self, x):
        return float(x)

    def sqrt(self, x):
        return math.sqrt(x)

    def trig_deg(self, deg):
        r = math.radians(float(deg))
        return (math.cos(r), math.sin(r))

    def rotate(self, v, theta):
        if theta == 0.0:
            return (float(v[0]), float(v[1]))
        c, s = math.cos(theta), math.sin(theta)
        return (c * v[0] - s * v[1], s * v[0] + c * v[1])

    def place(self, local, pose):
        r = self.rotate(local, pose[2])
        return (float(pose[0]) + r[0], float(pose[1]) + r[1])

    def to_float(self, x) -> float:
        return float(x)

    def text(self, x) -> str:
        return repr(float(x))

    # ---- geometry decisions
    def normalize_point(self, p, *, scale=1.0, origin=(0.0, 0.0)):
        return pg.normalized_point(p, scale=scale, origin=origin)

    def normalize_line(self, l, *, scale=1.0, origin=(0.0, 0.0)):
        return pg.normalized_line(l, scale=scale, origin=origin)

    def same_point(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> bool:
        return pg.point_separation(p, q, scale=scale, origin=origin) <= self.tol

    def separation(self, l, m, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        """Scale-free separation of two lines (0 when they coincide)."""
        return pg.line_separation(l, m, scale=scale, origin=origin)

    def lines_coincide(self, l, m, *, scale=1.0, origin=(0.0, 0.0)) -> bool:
        return self.separation(l, m, scale=scale, origin=origin) <= self.tol

    def is_zero_vector(self, v, *, reference: float) -> bool:
        return float(np.linalg.norm(np.asarray(v, dtype=float))) <= self.tol * reference

    # ---- scale-free measures, as floats (exactly 0 only for an exact zero)
    def point_gap(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        """Separation of two points (see :func:`mechgraph.projective.point_separation`)."""
        return pg.point_separation(p, q, scale=scale, origin=origin)

    def collinearity(self, p, q, r, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        """Collinearity residual of three points (see :func:`mechgraph.projective.collinearity`)."""
        return pg.collinearity(p, q, r, scale=scale, origin=origin)

    def on_line(self, p, l, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        """Incidence residual of a point and a line (see :func:`mechgraph.projective.point_on_line`)."""
        return pg.point_on_line(p, l, scale=scale, origin=origin)

    # ---- linear algebra
    def matrix(self, rows, ncols: int):
        return np.asarray(rows, dtype=float).reshape(-1, ncols)

    def rank(self, A, rank_tol: float) -> int:
        if A.size == 0:
            return 0
        s = np.linalg.svd(_normalise_rows(A), compute_uv=False)
        return int(np.sum(s > rank_tol * s[0])) if s.size and s[0] > 0.0 else 0

    def null_vector(self, A):
        return np.linalg.svd(_normalise_rows(A), full_matrices=True)[2][-1]

    def solve(self, A, B):
        """Solution X of the consistent, full-column-rank system A X = B."""
        norms = np.linalg.norm(A, axis=1)
        norms[norms == 0.0] = 1.0
        return np.linalg.lstsq(A / norms[:, None], B / norms[:, None], rcond=None)[0]


def _normalise_rows(A: np.ndarray) -> np.ndarray:
    norms = np.linalg.norm(A, axis=1)
    norms[norms == 0.0] = 1.0
    return A / norms[:, None]


#: The default float arithmetic.
FLOAT = FloatArithmetic()


class PrecisionArithmetic(FloatArithmetic):
    """mpmath numbers with ``digits`` significant digits, in a private context.

    Parameters
    ----------
    digits : int, default 50
        Working precision in decimal digits (at least 16).
    tol : float, optional
        Coincidence tolerance; default ``10**-(3 * digits // 4)``, which leaves a
        quarter of the digits for the round-off of a long construction.

    Examples
    --------
    >>> a = PrecisionArithmetic(30)
    >>> a.text(a.num(0.1) * 3)
    '0.3'
    """

    name = "precision"
    exact = False

    def __init__(self, digits: int = 50, tol: float | None = None):
        import mpmath

        if not isinstance(digits, int) or digits < 16:
            raise ValueError(f"digits must be a whole number of at least 16, got {digits!r}")
        self.digits = digits
        self.ctx = mpmath.MPContext()
        self.ctx.dps = digits
        self.tol = float(tol) if tol is not None else 10.0 ** (-(3 * digits // 4))
        self.zero = self.ctx.mpf(0)
        self.one = self.ctx.mpf(1)

    def num(self, x):
        return self.ctx.mpf(decimal_text(x)) if not isinstance(x, self.ctx.mpf) else x

    def sqrt(self, x):
        return self.ctx.sqrt(x)

    def trig_deg(self, deg):
        d = self.num(deg) / 180
        return (self.ctx.cospi(d), self.ctx.sinpi(d))

    def rotate(self, v, theta):
        x, y = self.num(v[0]), self.num(v[1])
        if theta == 0:
            return (x, y)
        t = self.num(theta)
        c, s = self.ctx.cos(t), self.ctx.sin(t)
        return (c * x - s * y, s * x + c * y)

    def place(self, local, pose):
        r = self.rotate(local, pose[2])
        return (self.num(pose[0]) + r[0], self.num(pose[1]) + r[1])

    def to_float(self, x) -> float:
        return float(x)

    def text(self, x) -> str:
        return self.ctx.nstr(x, self.digits)

    def _sized(self, p, scale, origin):
        s, ox, oy = self.num(scale), self.num(origin[0]), self.num(origin[1])
        return ((p[0] - ox * p[2]) / s, (p[1] - oy * p[2]) / s, p[2])

    def normalize_point(self, p, *, scale=1.0, origin=(0.0, 0.0)):
        """Finite: ``(x/w, y/w, 1)``; at infinity: the unit direction (as :func:`mechgraph.projective.normalized_point`)."""
        x, y, w = (self.num(c) for c in p)
        if w != 0:
            return (x / w, y / w, self.one)
        n = self.ctx.sqrt(x * x + y * y)
        if n == 0:
            raise ValueError(f"not a point: {p!r}")
        if (x if x != 0 else y) < 0:
            n = -n
        return (x / n, y / n, self.zero)

    def normalize_line(self, l, *, scale=1.0, origin=(0.0, 0.0)):
        l = tuple(self.num(c) for c in l)
        s, ox, oy = self.num(scale), self.num(origin[0]), self.num(origin[1])
        u = (l[0] * s, l[1] * s, l[2] + l[0] * ox + l[1] * oy)
        n = self.ctx.sqrt(u[0] ** 2 + u[1] ** 2 + u[2] ** 2)
        if n == 0:
            raise ValueError(f"not a line: {l!r}")
        key = l[0] if l[0] != 0 else (l[1] if l[1] != 0 else l[2])
        if key < 0:
            n = -n
        return (l[0] / n, l[1] / n, l[2] / n)

    def _sine(self, u, v):
        c = pg.cross(u, v)
        nu = self.ctx.sqrt(pg.dot(u, u))
        nv = self.ctx.sqrt(pg.dot(v, v))
        if nu == 0 or nv == 0:
            return 0.0
        return float(self.ctx.sqrt(pg.dot(c, c)) / (nu * nv))

    def same_point(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> bool:
        return self._sine(self._sized(p, scale, origin), self._sized(q, scale, origin)) <= self.tol

    def separation(self, l, m, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        s, ox, oy = self.num(scale), self.num(origin[0]), self.num(origin[1])

        def sized(x):
            return (x[0] * s, x[1] * s, x[2] + x[0] * ox + x[1] * oy)

        return self._sine(sized(l), sized(m))

    def is_zero_vector(self, v, *, reference: float) -> bool:
        n = self.ctx.sqrt(sum(c * c for c in v))
        return float(n) <= self.tol * float(reference)

    def _unit(self, v):
        n = self.ctx.sqrt(pg.dot(v, v))
        return None if n == 0 else (v[0] / n, v[1] / n, v[2] / n)

    def point_gap(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        return self._sine(self._sized(p, scale, origin), self._sized(q, scale, origin))

    def collinearity(self, p, q, r, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        vs = [self._unit(self._sized(tuple(self.num(c) for c in t), scale, origin)) for t in (p, q, r)]
        if any(v is None for v in vs):
            return 0.0
        return float(abs(pg.dot(pg.cross(vs[0], vs[1]), vs[2])))

    def on_line(self, p, l, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        u = self._unit(self._sized(tuple(self.num(c) for c in p), scale, origin))
        s, ox, oy = self.num(scale), self.num(origin[0]), self.num(origin[1])
        v = self._unit((l[0] * s, l[1] * s, l[2] + l[0] * ox + l[1] * oy))
        if u is None or v is None:
            return 0.0
        return float(abs(pg.dot(u, v)))

    def matrix(self, rows, ncols: int):
        m = self.ctx.matrix(len(rows), ncols)
        for i, r in enumerate(rows):
            for j, v in enumerate(r):
                m[i, j] = v
        return m

    def _normalised(self, A):
        B = A.copy()
        for i in range(B.rows):
            n = self.ctx.sqrt(sum(B[i, j] ** 2 for j in range(B.cols)))
            if n != 0:
                for j in range(B.cols):
                    B[i, j] /= n
        return B

    def rank(self, A, rank_tol: float) -> int:
        """Rank decided in double precision: ``rank_tol`` lies far above double round-off,
        so the decision is the same, at a fraction of the cost (the solve keeps full precision)."""
        if A.rows == 0:
            return 0
        F = np.array([[float(A[i, j]) for j in range(A.cols)] for i in range(A.rows)])
        return FLOAT.rank(F, rank_tol)

    def null_vector(self, A):
        B = self._normalised(A)
        if B.rows < B.cols:  # pad with zero rows so that V is square
            C = self.ctx.zeros(B.cols, B.cols)
            for i in range(B.rows):
                for j in range(B.cols):
                    C[i, j] = B[i, j]
            B = C
        _, s, V = self.ctx.svd_r(B)
        k = min(range(len(s)), key=lambda i: s[i])
        return [V[k, j] for j in range(V.cols)]

    def _svd_solve(self, A, B):
        """Least-squares solution in full precision by the SVD (rows = unknowns, columns = right-hand sides)."""
        U, S, V = self.ctx.svd_r(A, full_matrices=False)
        UtB = U.T * B
        return [[sum(V[k, i] * UtB[k, c] / S[k] for k in range(len(S))) for c in range(B.cols)] for i in range(A.cols)]

    def solve(self, A, B):
        """Solution of the consistent, full-column-rank system A X = B (rows = unknowns).

        The system is consistent, so any square subsystem of full rank gives the
        solution: the rows are chosen in double precision (greedy Gram-Schmidt),
        then the square system is solved by LU decomposition in full precision.
        """
        F = _normalise_rows(np.array([[float(A[i, j]) for j in range(A.cols)] for i in range(A.rows)]))
        chosen = _independent_rows(F)
        if len(chosen) < A.cols:
            return self._svd_solve(A, B)  # too close to singular for a row choice in doubles
        S = self.ctx.matrix(A.cols, A.cols)
        R = self.ctx.matrix(A.cols, B.cols)
        for r, i in enumerate(chosen):
            for j in range(A.cols):
                S[r, j] = A[i, j]
            for c in range(B.cols):
                R[r, c] = B[i, c]
        cols = [self.ctx.lu_solve(S, R.column(c)) for c in range(B.cols)]
        return [[cols[c][i] for c in range(B.cols)] for i in range(A.cols)]


def _independent_rows(F: np.ndarray, rel_tol: float = 1e-8) -> list[int]:
    """Indices of rows of ``F`` (normalised) that are independent, chosen greedily, up to its column count.

    ``rel_tol`` is the share of a row's length that must lie outside the span
    of the rows chosen before it.
    """
    basis: list[np.ndarray] = []
    chosen = []
    for i, row in enumerate(F):
        r = row.copy()
        for q in basis:
            r -= (q @ r) * q
        for q in basis:  # twice is enough (re-orthogonalisation)
            r -= (q @ r) * q
        n = float(np.linalg.norm(r))
        if n > rel_tol:
            basis.append(r / n)
            chosen.append(i)
            if len(chosen) == F.shape[1]:
                break
    return chosen


class ExactArithmetic:
    """Exact numbers in one sympy field that holds every input of a mechanism.

    Build it with :meth:`for_mechanism`; it collects every coordinate, every
    direction (exact cosine and sine of angles in degrees: sympy gives surds
    for angles such as 30 or 45 degrees) and every square root the drivers
    need, and constructs the smallest field containing them (``QQ``, or an
    algebraic extension ``QQ<a>``).  Arithmetic in it is exact and canonical,
    so every zero test is exact.

    Examples
    --------
    >>> a = ExactArithmetic.from_numbers([0.1, 37.2])
    >>> a.text(a.num(37.2) - a.num(0.1) * 372)
    '0'
    """

    name = "exact"
    exact = True
    tol = 0.0

    def __init__(self, domain, values: dict):
        self.K = domain
        self._values = values
        self.zero = domain.zero
        self.one = domain.one

    @classmethod
    def from_numbers(cls, numbers, extra_exprs=()) -> "ExactArithmetic":
        """A field holding the exact decimals of ``numbers`` and the sympy expressions ``extra_exprs``."""
        from sympy import Rational
        from sympy.polys.constructor import construct_domain

        exprs = [Rational(decimal_text(x)) for x in numbers] + list(extra_exprs)
        if not exprs:
            exprs = [Rational(0)]
        try:
            K, _ = construct_domain(exprs, extension=True)
        except Exception as e:  # sympy raises several kinds here
            raise NumberKindError(f"exact arithmetic cannot hold these inputs in one number field: {e}") from None
        if K.is_ZZ:
            K = K.get_field()
        if K.is_EX or K.is_EXRAW:
            raise NumberKindError(
                "exact arithmetic needs inputs that lie in one algebraic number field; "
                "give directions as vectors [dx, dy] or use the high-precision arithmetic"
            )
        return cls(K, {})

    # ---- numbers
    def num(self, x):
        if isinstance(x, self.K.dtype):
            return x
        from sympy import Rational

        return self.K.from_sympy(Rational(x if isinstance(x, str) else decimal_text(x)))

    def from_expr(self, expr):
        """An element of the field from a sympy expression (e.g. a surd)."""
        try:
            return self.K.from_sympy(expr)
        except Exception:
            raise NumberKindError(f"{expr} does not lie in the number field {self.K} of this mechanism") from None

    def sqrt(self, x):
        from sympy import sqrt

        return self.from_expr(sqrt(self.K.to_sympy(x)))

    def trig_deg(self, deg):
        from sympy import Rational, cos, pi, sin

        a = pi * Rational(decimal_text(deg)) / 180
        return (self.from_expr(cos(a)), self.from_expr(sin(a)))

    def rotate(self, v, theta):
        if theta != 0:
            raise NumberKindError("exact arithmetic works at the case's own position only (link rotations must be zero)")
        return (self.num(v[0]), self.num(v[1]))

    def place(self, local, pose):
        r = self.rotate(local, pose[2])
        return (self.num(pose[0]) + r[0], self.num(pose[1]) + r[1])

    def to_float(self, x) -> float:
        return float(self.K.to_sympy(x).evalf(20))

    def to_sympy(self, x):
        return self.K.to_sympy(x)

    def text(self, x) -> str:
        return str(self.K.to_sympy(x))

    # ---- geometry decisions: exact zero
    def normalize_point(self, p, *, scale=1.0, origin=(0.0, 0.0)):
        p = tuple(self.num(c) for c in p)
        for c in (p[2], p[0], p[1]):
            if c != self.zero:
                return (p[0] / c, p[1] / c, p[2] / c)
        raise ValueError(f"not a point: {p!r}")

    def normalize_line(self, l, *, scale=1.0, origin=(0.0, 0.0)):
        l = tuple(self.num(c) for c in l)
        for c in (l[0], l[1], l[2]):
            if c != self.zero:
                return (l[0] / c, l[1] / c, l[2] / c)
        raise ValueError(f"not a line: {l!r}")

    def same_point(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> bool:
        return all(c == self.zero for c in pg.cross(p, q))

    def separation(self, l, m, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        if all(c == self.zero for c in pg.cross(l, m)):
            return 0.0
        fl = [self.to_float(c) for c in l]
        fm = [self.to_float(c) for c in m]
        return max(pg.line_separation(fl, fm, scale=float(scale), origin=tuple(float(o) for o in origin)), 1e-300)

    def lines_coincide(self, l, m, *, scale=1.0, origin=(0.0, 0.0)) -> bool:
        return all(c == self.zero for c in pg.cross(l, m))

    def is_zero_vector(self, v, *, reference: float) -> bool:
        return all(c == self.zero for c in v)

    def _floats(self, t):
        return tuple(self.to_float(c) for c in t)

    def point_gap(self, p, q, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        if self.same_point(p, q):
            return 0.0
        return max(pg.point_separation(self._floats(p), self._floats(q), scale=float(scale), origin=origin), 1e-300)

    def collinearity(self, p, q, r, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        if pg.dot(pg.cross(p, q), r) == self.zero:
            return 0.0
        fp, fq, fr = (self._floats(t) for t in (p, q, r))
        return max(pg.collinearity(fp, fq, fr, scale=float(scale), origin=origin), 1e-300)

    def on_line(self, p, l, *, scale=1.0, origin=(0.0, 0.0)) -> float:
        if pg.dot(p, l) == self.zero:
            return 0.0
        return max(pg.point_on_line(self._floats(p), self._floats(l), scale=float(scale), origin=origin), 1e-300)

    # ---- linear algebra (sympy DomainMatrix over the field)
    def matrix(self, rows, ncols: int):
        from sympy.polys.matrices import DomainMatrix

        return DomainMatrix([[self.num(v) for v in r] for r in rows], (len(rows), ncols), self.K)

    def rank(self, A, rank_tol: float) -> int:
        return A.rank() if A.shape[0] else 0

    def null_vector(self, A):
        ns = A.nullspace()
        return [ns[0, j].element for j in range(ns.shape[1])] if ns.shape[0] else [self.zero] * A.shape[1]

    def solve(self, A, B):
        """Exact solution of the consistent, full-column-rank system A X = B (rows = unknowns)."""
        n = A.shape[1]
        aug = A.hstack(B)
        R, pivots = aug.rref()
        if tuple(pivots[:n]) != tuple(range(n)) or any(p >= n for p in pivots):
            raise NumberKindError("the exact velocity equations have no unique solution")
        return [[R[i, n + c].element for c in range(B.shape[1])] for i in range(n)]


def make_arithmetic(kind: str, mech=None, *, tol: float = 1e-9, digits: int = 50):
    """The arithmetic object for a kind name.

    Parameters
    ----------
    kind : {"float", "exact", "precision"}
    mech : Mechanism, optional
        Needed for ``"exact"`` (the field is built from its inputs).
    tol : float, default 1e-9
        Coincidence tolerance of the float kind.
    digits : int, default 50
        Working digits of the precision kind.

    Raises
    ------
    ValueError
        For an unknown kind name.

    Examples
    --------
    >>> make_arithmetic("precision", digits=30).digits
    30
    """
    if kind == "float":
        return FloatArithmetic(tol)
    if kind == "precision":
        return PrecisionArithmetic(digits)
    if kind == "exact":
        if mech is None:
            raise ValueError("exact arithmetic is built for a mechanism: pass mech")
        return exact_for(mech)
    raise ValueError(f"arithmetic {kind!r} is not known; use one of {', '.join(KINDS)}")


#: Largest degree of number field exact arithmetic builds.  Angles such as 15,
#: 18, 22.5, 30, 45 or 60 degrees need degree 8 at most; 37.2 degrees needs 40,
#: which sympy cannot handle in reasonable time.
MAX_EXACT_DEGREE = 16


def exact_for(mech, *, max_degree: int = MAX_EXACT_DEGREE) -> ExactArithmetic:
    """The exact arithmetic of a mechanism: a field holding all its inputs (see :class:`ExactArithmetic`).

    Raises
    ------
    NumberKindError
        When the field would have a degree above ``max_degree`` (directions at
        angles without a short closed form): the message says which angles,
        and points to vectors or the high-precision arithmetic.
    """
    from math import lcm

    from sympy import Rational, cos, pi, sin, sqrt, totient

    n_root, radicands, angles = 1, set(), []
    for j in mech.joints:
        for _, deg in j.directions():
            if deg is not None:
                r = Rational(decimal_text(deg)) / 180
                n_root = lcm(n_root, 2 * int(r.q))
                angles.append(deg)
    for d in mech.drivers:
        joint = mech.joint_by_name[d.joint]
        if joint.drive == "sliding":
            vector, deg = joint.directions()[0]
            if deg is None:
                ux, uy = (Rational(decimal_text(c)) for c in vector)
                rad = ux * ux + uy * uy
                if not sqrt(rad).is_rational:
                    radicands.add(rad)
    degree = int(totient(n_root)) * 2 ** len(radicands)
    if degree > max_degree:
        shown = ", ".join(f"{float(a):g}" for a in angles) or "none"
        raise NumberKindError(
            f"exact arithmetic would need a number field of degree {degree} (above {max_degree}) for the directions at "
            f"{shown} degrees and the slider axes' lengths; give such directions as vectors [dx, dy], or use "
            "--arithmetic precision"
        )
    numbers, exprs = [], []
    for j in mech.joints:
        for p in j.reference_points():
            numbers += list(p)
        numbers += list(j.exact_inputs())
        for vector, deg in j.directions():
            if deg is not None:
                a = pi * Rational(decimal_text(deg)) / 180
                exprs += [cos(a), sin(a)]
            else:
                numbers += list(vector)
    for d in mech.drivers:
        numbers.append(d.rate)
        joint = mech.joint_by_name[d.joint]
        if joint.drive == "sliding":
            vector, deg = joint.directions()[0]
            if deg is None:
                ux, uy = (Rational(decimal_text(c)) for c in vector)
                exprs.append(sqrt(ux * ux + uy * uy))
    for p in mech.points:
        numbers += list(p.at)
    return ExactArithmetic.from_numbers(numbers, exprs)
