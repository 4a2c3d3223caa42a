"""The package's layout rules (DEVELOPERS.md, "Layout and its rules"): no import cycle between modules,
no module too long, and the stages that ask the regime registry name no regime."""
import ast
import re

from conftest import ROOT

PACKAGE = ROOT / "clusterexp"
MAX_LINES = 600
REGIME_WORDS = re.compile(r'["\'](pairphase|landau|exclusion|ideal|spectrum)["\']')
REGISTRY_USERS = ["derivation.py", "limits.py", "export/common.py", "export/latex.py", "export/json_export.py",
                  "export/text.py", "export/quantities.py", "export/series_lines.py"]


def _modules() -> dict[str, object]:
    out = {}
    for path in PACKAGE.rglob("*.py"):
        name = ".".join(path.relative_to(ROOT).with_suffix("").parts)
        out[name[: -len(".__init__")] if name.endswith(".__init__") else name] = path
    return out


def _imports(name: str, path, modules) -> set[str]:
    tree = ast.parse(path.read_text())
    for node in ast.walk(tree):   # imports for type checking only do not run
        if isinstance(node, ast.If) and getattr(node.test, "id", "") == "TYPE_CHECKING":
            node.body = []
    here = name.split(".") if path.name == "__init__.py" else name.split(".")[:-1]
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            base = here[: len(here) - node.level + 1] if node.level else []
            target = ".".join(base + ([node.module] if node.module else []))
            for alias in node.names:
                candidate = f"{target}.{alias.name}"
                found.add(candidate if candidate in modules else target)
        elif isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
    return {m for m in found if m in modules and m != name}


def _cycles(edges: dict[str, set[str]]) -> list[list[str]]:
    index, low, stack, on, out, counter = {}, {}, [], set(), [], [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in edges[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            component = []
            while True:
                w = stack.pop()
                on.discard(w)
                component.append(w)
                if w == v:
                    break
            if len(component) > 1:
                out.append(sorted(component))
    for v in edges:
        if v not in index:
            visit(v)
    return out


def test_cycle_finder_finds_a_cycle():
    assert _cycles({"a": {"b"}, "b": {"a"}, "c": set()}) == [["a", "b"]]


def test_no_import_cycle_between_modules():
    modules = _modules()
    edges = {name: _imports(name, path, modules) for name, path in modules.items()}
    assert _cycles(edges) == []


def test_no_module_is_too_long():
    long = {str(p.relative_to(ROOT)): n for p in PACKAGE.rglob("*.py")
            if (n := len(p.read_text().splitlines())) > MAX_LINES}
    assert long == {}


def test_the_stages_that_ask_the_registry_name_no_regime():
    for relative in REGISTRY_USERS + ["language/build.py"]:
        text = (PACKAGE / relative).read_text()
        hits = REGIME_WORDS.findall(text)
        if relative == "language/build.py":   # the grammar's own `clusters spectrum { ... }` block
            hits = [h for h in hits if h != "spectrum"]
        assert hits == [], (relative, hits)
