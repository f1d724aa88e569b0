"""The house rules of the package, read from its source with ``ast``: private
names stay inside their sub-package, imports have no cycles, and only the
algebra layer sees python-flint (common practice, no source)."""

import ast
import pathlib

import criticality

ROOT = pathlib.Path(criticality.__file__).resolve().parent

#: Modules outside ``algebra/`` that still import flint while their owners
#: seal them (the critical set is being rewritten on the ring view).
FLINT_PENDING = {"criticality.local.critical"}
#: Import cycles whose removal is under way elsewhere (results and their LaTeX
#: printers, split by the renderer registry).
CYCLES_PENDING = {frozenset({"criticality.hopf_analysis.results", "criticality.outputs.latex",
                             "criticality.outputs.latex_sections"})}


def _modules():
    out = {}
    for path in ROOT.rglob("*.py"):
        parts = list(path.relative_to(ROOT.parent).with_suffix("").parts)
        package = parts[-1] == "__init__"
        if package:
            parts = parts[:-1]
        out[".".join(parts)] = (path, package)
    return out


def _room(module: str, modules) -> str:
    """The sub-package a module lives in (``criticality`` for the top level)."""
    parts = module.split(".")
    if len(parts) > 2 or (len(parts) == 2 and modules[module][1]):
        return ".".join(parts[:2])
    return parts[0]


_IMPORTS: dict = {}


def _imports(modules):
    """``[(module, imported module, name or None, at module level)]`` (parsed
    once per set of modules and shared by the tests)."""
    key = tuple(sorted(modules))
    if key not in _IMPORTS:
        _IMPORTS[key] = _parse_imports(modules)
    return _IMPORTS[key]


def _parse_imports(modules):
    out = []
    for module, (path, package) in modules.items():
        tree = ast.parse(path.read_text())
        top = set(map(id, tree.body))
        here = module if package else module.rsplit(".", 1)[0]
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom):
                if node.level:
                    base = here.split(".")[:len(here.split(".")) - node.level + 1]
                    target = ".".join(base + ([node.module] if node.module else []))
                else:
                    target = node.module or ""
                for alias in node.names:
                    full = f"{target}.{alias.name}"
                    target_module = full if full in modules else target
                    name = None if full in modules else alias.name
                    out.append((module, target_module, name, id(node) in top))
            elif isinstance(node, ast.Import):
                for alias in node.names:
                    out.append((module, alias.name, None, id(node) in top))
    return out


def test_private_names_stay_inside_their_sub_package():
    """No module imports an underscore name from another sub-package."""
    modules = _modules()
    bad = [(m, t, n) for m, t, n, _ in _imports(modules)
           if t in modules and n and n.startswith("_") and not n.startswith("__")
           and _room(t, modules) != _room(m, modules)]
    assert bad == []


def _cycles(edges):
    index, low, stack, on, found = {}, {}, [], set(), []

    def visit(v):
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in edges.get(v, ()):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            part = set()
            while True:
                w = stack.pop()
                on.discard(w)
                part.add(w)
                if w == v:
                    break
            if len(part) > 1:
                found.append(frozenset(part))

    for v in list(edges):
        if v not in index:
            visit(v)
    return set(found)


def test_no_import_cycles_even_through_function_level_imports():
    """Modules form a directed acyclic graph of imports, counting the imports
    made inside functions (a deferred import hides a cycle, it does not
    remove it)."""
    modules = _modules()
    edges: dict = {}
    for m, t, _, _ in _imports(modules):
        if t in modules and t != m and not modules[t][1]:
            edges.setdefault(m, set()).add(t)
    assert _cycles(edges) <= CYCLES_PENDING


def test_only_the_algebra_layer_imports_flint():
    """python-flint is an implementation of the algebra interface; the other
    rooms compute through the fields and their ring view."""
    modules = _modules()
    users = {m for m, t, _, _ in _imports(modules)
             if t == "flint" or t.startswith("flint.") or t.endswith(".flint_field")
             or t.endswith(".sympy_field")}
    outside = {m for m in users if _room(m, modules) != "criticality.algebra"}
    assert outside <= FLINT_PENDING
