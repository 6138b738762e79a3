"""Independent outside references for mechgraph's tests.

Nothing in this package imports mechgraph: the reference values are computed
from published closed forms, from a plain sympy loop-closure derivation, and
from plain line intersection with numpy (see :mod:`validation.references`).
"""
