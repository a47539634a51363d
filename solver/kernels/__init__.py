"""The kernel registry: every part of Slackline asks here which kernels exist.

Config validation, the command line's --kernel choices, the window's kernel
list and parameter rows, the experiment schema's enumeration, the decision
function and the exported classifier file all read REGISTRY.  A new kernel is
one module (a Kernel object, see base.py) and one ``register`` line below.
"""

from __future__ import annotations

from solver.kernels import linear, polynomial, rbf
from solver.kernels.base import Kernel
from solver.kernels.rbf import rbf_matrix

REGISTRY: dict[str, Kernel] = {}


def register(kernel: Kernel) -> Kernel:
    """Add ``kernel`` (replacing one of the same name); returns it."""
    REGISTRY[kernel.name] = kernel
    return kernel


def unregister(name: str) -> None:
    REGISTRY.pop(name, None)


def names() -> tuple[str, ...]:
    return tuple(REGISTRY)


def parameter_names() -> tuple[str, ...]:
    """Every solver.parameters name some registered kernel reads, in registry order."""
    seen: list[str] = []
    for kernel in REGISTRY.values():
        seen += [name for name in kernel.parameters if name not in seen]
    return tuple(seen)


def get(name: str) -> Kernel:
    """The kernel called ``name``; KeyError for an unknown one (config validates first)."""
    return REGISTRY[name]


register(linear.KERNEL)
register(polynomial.KERNEL)
register(rbf.KERNEL)

__all__ = ["Kernel", "REGISTRY", "register", "unregister", "names", "parameter_names", "get",
           "rbf_matrix"]
