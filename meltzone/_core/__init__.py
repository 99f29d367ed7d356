"""The numba core: plain floats and contiguous arrays in and out, no validation, units, I/O or printing.

``layout`` (index constants; pure Python), ``melt`` (melt-fraction laws), ``structure`` (equations of state and
the inward structure integration), ``roots`` (the bracketing root finder), ``physics`` (the boundary-layer
scheme's right-hand side and profile), ``dopri`` (the Dormand-Prince 5(4) step), ``loop`` (step control and
events) and ``record`` (growable output buffers). Importing this package imports no numba; ``_jit`` settles
the jit options and the cache folder when a kernel module is first imported.
"""
