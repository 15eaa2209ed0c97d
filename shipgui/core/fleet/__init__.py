"""The minimum fleet without a working-day limit: the "can follow" order in
prefix form, maximum matching with its König certificate, least empty driving,
the independent check, and :func:`~.solve.solve_day` that runs them."""
