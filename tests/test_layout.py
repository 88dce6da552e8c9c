"""The code map of DEVELOPERS.md holds: imports run one way, no cycles, each table has one home.

Layers (design notes sec. 2): core <- edge modules <- preflight | bench | watch <- demo <- commands
<- cli. The three flow packages never import one another. Checked on the source with ``ast``
(every import, also those inside functions), so a lazy import cannot hide a wrong direction.
"""

import ast
import os

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
PKG = os.path.join(ROOT, "estimator")
FLOWS = ("preflight", "bench", "watch")
# rank of each part; a module may import only parts of lower or equal rank (equal: same part)
RANK = {"core": 0, "edge": 1, "preflight": 2, "bench": 2, "watch": 2, "demo": 3, "commands": 4,
        "cli": 5}
# known wrong edges still being removed (each must disappear; the test fails when one is fixed
# and left listed, so the list cannot go stale)
PENDING = set()
PENDING_CYCLES = []


def _modules():
    out = {}
    for folder, _dirs, files in os.walk(PKG):
        for name in files:
            if name.endswith(".py"):
                path = os.path.join(folder, name)
                rel = os.path.relpath(path, ROOT)[:-3].replace(os.sep, ".")
                if rel.endswith(".__init__"):
                    rel = rel[: -len(".__init__")]
                out[rel] = path
    return out


def _part(module):
    bits = module.split(".")
    if len(bits) == 1:
        return "edge"
    if bits[1] in RANK:
        return bits[1]
    if bits[1] in ("cli", "__main__"):
        return "cli"
    return "edge"


def _imports(path, modules):
    with open(path, encoding="utf-8") as fh:
        tree = ast.parse(fh.read())
    found = set()
    for node in ast.walk(tree):
        names = []
        if isinstance(node, ast.Import):
            names = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names = [node.module] + [node.module + "." + a.name for a in node.names]
        for name in names:
            if name.startswith("estimator"):
                while name and name not in modules:
                    name = name.rpartition(".")[0]
                if name and name != "estimator":
                    found.add(name)
    return found


def _graph():
    modules = _modules()
    return {m: _imports(p, modules) - {m} for m, p in modules.items()}


def test_imports_run_one_way_and_flows_stay_apart():
    wrong, seen = [], set()
    for mod, deps in _graph().items():
        for dep in deps:
            a, b = _part(mod), _part(dep)
            if a == b:
                continue
            if RANK[b] > RANK[a] or (a in FLOWS and b in FLOWS):
                if (mod, dep) in PENDING:
                    seen.add((mod, dep))
                else:
                    wrong.append("%s (%s) imports %s (%s)" % (mod, a, dep, b))
    assert not wrong, "\n".join(sorted(wrong))
    assert seen == PENDING, "fixed, remove from PENDING: %s" % sorted(PENDING - seen)


def test_no_import_cycle():
    graph = _graph()
    state, cycles = {}, []

    def visit(node, stack):
        state[node] = 1
        for dep in graph.get(node, ()):
            if state.get(dep) == 1:
                cycles.append(" -> ".join(stack[stack.index(dep):] + [dep]))
            elif dep not in state:
                visit(dep, stack + [dep])
        state[node] = 2

    for node in graph:
        if node not in state:
            visit(node, [node])
    pending = [c for c in cycles if c in PENDING_CYCLES]
    assert not [c for c in cycles if c not in PENDING_CYCLES], "\n".join(cycles)
    assert sorted(pending) == sorted(PENDING_CYCLES), "fixed, remove from PENDING_CYCLES"


def test_a_negative_control_sees_a_wrong_import(tmp_path):
    # the checker must be able to fail: a fake core module importing a flow is caught
    src = tmp_path / "x.py"
    src.write_text("def f():\n    from estimator.bench.reader import read_bench\n")
    assert "estimator.bench.reader" in _imports(str(src), _modules())


def test_safety_sentences_live_in_one_module():
    # design notes sec. 6 / issue 10: every safety sentence once, in estimator/cautions.py
    phrases = ("plane of the rotor", "tethered or low hover", "charge and store", "props off")
    offenders = []
    for mod, path in _modules().items():
        if mod == "estimator.cautions":
            continue
        with open(path, encoding="utf-8") as fh:
            text = fh.read().lower()
        # docstrings (help text) may mention cautions; string literals that print them may not
        tree = ast.parse(text)
        docs = {id(owner.body[0].value) for owner in ast.walk(tree)
                if isinstance(owner, (ast.Module, ast.FunctionDef, ast.ClassDef, ast.AsyncFunctionDef))
                and owner.body and isinstance(owner.body[0], ast.Expr)}
        for node in ast.walk(tree):
            if isinstance(node, ast.Constant) and isinstance(node.value, str) and id(node) not in docs:
                if any(p in node.value for p in phrases):
                    offenders.append(mod)
    assert not offenders, sorted(set(offenders))


# a module holds one idea and stays under about 400 lines (design notes sec. 2; style.md habit 12)
MODULE_LINES_MAX = 400


def test_no_module_over_about_400_lines():
    long = {}
    for mod, path in _modules().items():
        with open(path, encoding="utf-8") as fh:
            lines = sum(1 for _ in fh)
        if lines > MODULE_LINES_MAX:
            long[mod] = lines
    assert not long, long
