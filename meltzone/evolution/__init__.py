"""Thermal evolution: the contract every scheme fulfils (:mod:`.contract`: History, MantleGrid, InStep,
Scheme), the table of schemes (:mod:`.schemes`), one module per scheme's friendly layer
(:mod:`.boundary_layer`) and radiogenic heating (:mod:`.heating`). The numba code lives in
:mod:`meltzone._core`; :func:`meltzone.evolve` (:mod:`meltzone.pipeline`) runs a whole planet.
"""
