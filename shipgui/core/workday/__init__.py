"""The least vehicles when every vehicle has one driver and a longest working day.

NP-hard (Fischetti, Martello & Toth, "The fixed job schedule problem with
spread-time constraints", Operations Research 35(6), 1987), so the answer is a
plan with a proven lower bound: column generation over routes with exact
pricing, integer plans over the generated routes, and branching to close the
gap while time allows.
"""
