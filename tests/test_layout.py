"""The package's layout guards the data flow: the import graph (read from the source with
``ast``, imports inside functions included, ``if TYPE_CHECKING:`` blocks left out) has no
cycle, no module imports a layer above its own, and no file is over 600 lines without a
stated reason. Layers, lowest first: read -> place in the column -> evidence -> cuts ->
faults -> outputs (DEVELOPERS.md, "Architecture map")."""

import ast
import importlib
import warnings
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "wellfault"

#: layers of the flow, lowest first: (name, first parts of the module names in it); "" is the
#: public API (wellfault/__init__.py)
LAYERS = [
    ('core', ['_buffers', '_lazy', '_moved', 'about', 'errors']),
    ('geo', ['geo']),
    ('io', ['io']),
    ('align', ['align']),
    ('evidence', ['evidence']),
    ('field', ['field']),
    ('live', ['live']),
    ('viz', ['viz']),
    ('synth', ['synth']),
    ('api', ['']),
    ('cli', ['cli']),
]

#: files over the limit, each with its reason
LONG_FILES = {
    "wellfault/live/watch.py": (
        "one class, WellWatcher (about 750 lines of a 930-line file): its state machine is one "
        "object; splitting it means extracting methods, a change beyond moving code"),
    "wellfault/align/engine.py": (
        "about 190 lines are the module docstring, the definitions (cost, jumps, cut evidence) "
        "the other align modules cite; the code is one class, AlignmentEngine"),
}

LIMIT = 600

#: old module paths kept for one release (thin, warn on import); nothing inside imports them
DEPRECATED = [
    "wellfault.column",
    "wellfault.curvecuts",
    "wellfault.demo",
    "wellfault.detect",
    "wellfault.dip",
    "wellfault.plots",
    "wellfault.precision",
    "wellfault.report",
    "wellfault.screen",
    "wellfault.track",
    "wellfault.trajectory",
]


def module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _type_checking(node) -> bool:
    test = getattr(node, "test", None)
    return isinstance(node, ast.If) and getattr(test, "id", getattr(test, "attr", "")) == \
        "TYPE_CHECKING"


def _imports(tree):
    todo = list(tree.body)
    while todo:
        node = todo.pop()
        if _type_checking(node):
            continue
        if isinstance(node, (ast.Import, ast.ImportFrom)):
            yield node
        todo.extend(ast.iter_child_nodes(node))


def import_graph() -> dict[str, set[str]]:
    """module -> the package's modules it imports (a ``from pkg import name`` that names a
    submodule counts as importing that submodule)."""
    paths = {module_name(p): p for p in PACKAGE.rglob("*.py")}
    graph = {}
    for mod, path in paths.items():
        is_pkg = path.name == "__init__.py"
        edges = set()
        for node in _imports(ast.parse(path.read_text())):
            if isinstance(node, ast.Import):
                edges.update(a.name for a in node.names if a.name in paths)
                continue
            if node.level:
                base = mod.split(".") if is_pkg else mod.split(".")[:-1]
                base = base[:len(base) - node.level + 1] + ([node.module] if node.module else [])
                target = ".".join(base)
            else:
                target = node.module or ""
            if target not in paths:
                continue
            subs = [f"{target}.{a.name}" for a in node.names if f"{target}.{a.name}" in paths]
            if len(subs) < len(node.names):
                edges.add(target)
            edges.update(subs)
        edges.discard(mod)
        graph[mod] = edges
    return graph


def layer_of(mod: str) -> int:
    rest = mod.split(".")[1:]
    first = rest[0] if rest else ""
    for i, (_name, tops) in enumerate(LAYERS):
        if first in tops:
            return i
    raise AssertionError(f"{mod} is in no layer of LAYERS: place it (DEVELOPERS.md, "
                         f"Architecture map) and add it there")


def find_cycle(graph):
    """One import cycle as a list of modules, or None."""
    state, stack = {}, []

    def visit(node):
        state[node] = 1
        stack.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return stack[stack.index(nxt):] + [nxt]
            if nxt not in state:
                found = visit(nxt)
                if found:
                    return found
        stack.pop()
        state[node] = 2
        return None

    for node in sorted(graph):
        if node not in state:
            found = visit(node)
            if found:
                return found
    return None


def against_the_flow(graph):
    return sorted(f"{a} ({LAYERS[layer_of(a)][0]}) imports {b} ({LAYERS[layer_of(b)][0]})"
                  for a, targets in graph.items() if a not in DEPRECATED
                  for b in targets if layer_of(b) > layer_of(a))


def long_files():
    out = []
    for p in sorted(PACKAGE.rglob("*.py")):
        rel = p.relative_to(PACKAGE.parent).as_posix()
        n = len(p.read_text().splitlines())
        if n > LIMIT and rel not in LONG_FILES:
            out.append(f"{rel}: {n} lines")
    return out


def test_no_import_cycle():
    graph = {m: e for m, e in import_graph().items() if m not in DEPRECATED}
    assert find_cycle(graph) is None, " -> ".join(find_cycle(graph))


def test_no_import_against_the_flow():
    assert against_the_flow(import_graph()) == []


def test_nothing_inside_imports_a_deprecated_path():
    graph = import_graph()
    assert [f"{a} imports {b}" for a, t in graph.items() for b in t
            if b in DEPRECATED and a not in DEPRECATED] == []


def test_no_long_file_without_a_reason():
    assert long_files() == []


def test_the_layout_test_detects_a_cycle():
    # the check itself, on a made-up graph (so a broken find_cycle cannot pass silently)
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": {"b"}, "b": set()}) is None


@pytest.mark.parametrize("old", DEPRECATED)
def test_deprecated_path_warns_and_still_works(old):
    import sys

    sys.modules.pop(old, None)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        mod = importlib.import_module(old)
    assert any(issubclass(w.category, DeprecationWarning) and old in str(w.message)
               for w in caught)
    assert [n for n in vars(mod) if not n.startswith("_") and n != "warn_moved"]
