"""Writers of results: the plan as the contract's JSON and the routes table
(CSV or XLSX).  They sit above the solvers and read only finished plans."""
