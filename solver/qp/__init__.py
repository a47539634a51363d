"""The cvxopt layer: one primal QP and one dual QP with structured KKT solvers,
and the working-set solvers around them.  Only solver.fit calls in here."""
