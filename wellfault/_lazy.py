"""Lazy public names of a package (PEP 562): a submodule is imported when one of its names is
first read, so that ``import wellfault`` and a command import only what they use (the import
rule of DEVELOPERS.md)."""

from __future__ import annotations

import importlib
import importlib.util
from collections.abc import Callable, Mapping

__all__ = ["lazy_exports"]


def lazy_exports(package: str, namespace: dict, exports: Mapping[str, tuple[str, ...]]
                 ) -> tuple[Callable[[str], object], Callable[[], list[str]], list[str]]:
    """The module ``__getattr__`` and ``__dir__`` of ``package`` and its lazy public names.

    ``exports`` maps a submodule (relative, e.g. ``".detect"``) to the names it gives the
    package. Reading one of them imports the submodule and keeps the value in ``namespace``
    (the package's globals), so later reads cost nothing. Any other name that is a submodule
    of the package is imported as such (``wellfault.evidence.detect`` without ``import
    wellfault.evidence.detect``).
    """
    where = {name: module for module, names in exports.items() for name in names}

    def __getattr__(name: str) -> object:
        module = where.get(name)
        if module is not None:
            value = getattr(importlib.import_module(module, package), name)
        elif not name.startswith("__") and importlib.util.find_spec(f"{package}.{name}"):
            value = importlib.import_module(f"{package}.{name}")
        else:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        namespace[name] = value
        return value

    def __dir__() -> list[str]:
        return sorted(set(namespace) | set(where))

    return __getattr__, __dir__, list(where)
