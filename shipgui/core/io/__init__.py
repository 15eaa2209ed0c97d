"""Reading the day's files (CSV, XLSX, plan files) and writing files crash-safely.

Reading only produces checked records; turning them into a validated day is
:mod:`shipgui.core.day`.  Nothing here imports a solver.
"""
