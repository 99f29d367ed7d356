"""Thomas algorithm for a tridiagonal system (Thomas 1949; any numerical-analysis text, e.g. Press et al.,
Numerical Recipes, 3rd ed. 2007, sec. 2.4 "tridag"; common practice). No pivoting: stable for the diagonally
dominant Jacobians of the implicit diffusion step (each row's diagonal holds M/dt plus the outflow
derivatives)."""

from __future__ import annotations

from ._jit import njit


@njit(leaf=True)
def solve(lower, diag, upper, rhs, out, work):
    """Solve A x = rhs for tridiagonal A: ``lower[i]`` = A[i, i-1] (lower[0] unused), ``diag[i]`` = A[i, i],
    ``upper[i]`` = A[i, i+1] (upper[n-1] unused). Writes x into ``out``; ``work`` (n) is scratch. Returns
    False if a pivot vanished (the caller then shortens the step)."""
    n = diag.shape[0]
    b = diag[0]
    if b == 0.0:
        return False
    out[0] = rhs[0] / b
    for i in range(1, n):
        work[i] = upper[i - 1] / b
        b = diag[i] - lower[i] * work[i]
        if b == 0.0:
            return False
        out[i] = (rhs[i] - lower[i] * out[i - 1]) / b
    for i in range(n - 2, -1, -1):
        out[i] -= work[i + 1] * out[i + 1]
    return True
