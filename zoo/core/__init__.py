"""The mathematics of cycloids: parameter sets, the lattice algebra, closed formulas, explicit
nets, canonical forms, reachability, synthesis and ring designs.

The bottom layer: it imports no database, command-line or web code.
"""
