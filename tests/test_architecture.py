"""The layering rule, enforced: engine <- io <- cli / tui. Only roomcalc/tui imports Textual;
the engine reads no files; `import roomcalc` and `roomcalc report` never load Textual."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parent.parent / "roomcalc"
STDLIB = set(sys.stdlib_module_names)
ENGINE_ALLOWED = {"numpy", "scipy", "roomcalc"}
FILE_MODULES = {"io", "os", "pathlib", "tomllib", "shutil", "tempfile", "glob", "csv", "json",
                "pickle", "sqlite3"}
UI = {"textual", "rich", "textual_plotext", "plotext"}


def _imports(path: Path):
    tree = ast.parse(path.read_text(encoding="utf-8"))
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                yield a.name, node.lineno
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            yield node.module, node.lineno


def _modules(sub: str):
    return sorted((PKG / sub).rglob("*.py"))


def test_engine_imports_only_numpy_scipy_and_itself():
    bad = []
    for f in _modules("engine"):
        for mod, line in _imports(f):
            top = mod.split(".")[0]
            if top == "roomcalc" and not mod.startswith("roomcalc.engine"):
                bad.append(f"{f.name}:{line} imports {mod}")
            elif top not in ENGINE_ALLOWED and top not in STDLIB:
                bad.append(f"{f.name}:{line} imports {mod}")
            elif top in FILE_MODULES:
                bad.append(f"{f.name}:{line} imports {mod} (the engine reads no files)")
    assert not bad, bad


def test_engine_never_opens_files():
    bad = []
    for f in _modules("engine"):
        for node in ast.walk(ast.parse(f.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Call):
                fn = node.func
                name = fn.id if isinstance(fn, ast.Name) else getattr(fn, "attr", "")
                if name in {"open", "read_text", "write_text", "loadtxt", "savetxt", "load",
                            "save", "fromfile", "genfromtxt"}:
                    bad.append(f"{f.name}:{node.lineno} calls {name}()")
    assert not bad, bad


def test_io_does_not_import_interface():
    bad = []
    for f in _modules("io"):
        for mod, line in _imports(f):
            if mod.split(".")[0] in UI or mod.startswith(("roomcalc.tui", "roomcalc.cli")):
                bad.append(f"{f.name}:{line} imports {mod}")
    assert not bad, bad


def test_only_tui_imports_textual():
    bad = []
    for f in PKG.rglob("*.py"):
        if "tui" in f.relative_to(PKG).parts:
            continue
        for mod, line in _imports(f):
            if mod.split(".")[0] in UI:
                bad.append(f"{f.relative_to(PKG)}:{line} imports {mod}")
    assert not bad, bad


def _loaded_after(code: str) -> set[str]:
    out = subprocess.run([sys.executable, "-c", code + "\nimport sys\n"
                          "print(' '.join(sorted(m for m in sys.modules)))"],
                         capture_output=True, text=True, check=True, cwd=PKG.parent)
    return set(out.stdout.split())


@pytest.mark.parametrize("code", [
    "import roomcalc",
    "import roomcalc.engine.analysis, roomcalc.io.roomfile, roomcalc.study, roomcalc.present.report, roomcalc.cli",
    "import io, contextlib\nfrom roomcalc.cli import main\n"
    "with contextlib.redirect_stdout(io.StringIO()):\n    assert main(['report', '--demo']) == 0",
])
def test_no_textual_loaded(code):
    loaded = _loaded_after(code)
    assert not {m for m in loaded if m.split(".")[0] in UI}


def test_interface_layers():
    # Inside tui: widgets never import screens or the app; screens never import the app.
    bad = []
    for f in _modules("tui/widgets"):
        for mod, line in _imports(f):
            if mod.startswith(("roomcalc.tui.screens", "roomcalc.tui.app")):
                bad.append(f"widgets/{f.name}:{line} imports {mod}")
    for f in _modules("tui/screens"):
        for mod, line in _imports(f):
            if mod.startswith("roomcalc.tui.app"):
                bad.append(f"screens/{f.name}:{line} imports {mod}")
    for f in [PKG / "tui" / "document.py"]:
        for mod, line in _imports(f):
            if mod.split(".")[0] in UI:
                bad.append(f"document.py:{line} imports {mod} (it holds no interface)")
    assert not bad, bad


def _imported_names(path: Path):
    """(module, name, line) of every ``from module import name`` in a file."""
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            for a in node.names:
                yield node.module, a.name, node.lineno


def test_core_layers():
    # engine <- io <- study <- present <- cli / tui: the core knows no front end, and the
    # answers are decided in study, not in the presenters.
    bad = []
    for sub, forbidden in (("study", ("roomcalc.present", "roomcalc.tui", "roomcalc.cli")),
                           ("present", ("roomcalc.tui", "roomcalc.cli"))):
        for f in _modules(sub):
            for mod, line in _imports(f):
                if mod.startswith(forbidden) or mod.split(".")[0] in UI:
                    bad.append(f"{sub}/{f.name}:{line} imports {mod}")
    assert not bad, bad


#: What only the core may call: the pipeline's steps (check, evaluate, target, exposure, plan).
PIPELINE = {("roomcalc.engine.analysis", "evaluate"), ("roomcalc.engine.analysis", "compare"),
            ("roomcalc.io.roomfile", "check_room"), ("roomcalc.io.roomfile", "read_room"),
            ("roomcalc.engine.criteria", "assess"), ("roomcalc.engine.planner", "plan")}
PIPELINE_MODULES = ("roomcalc.io.planning", "roomcalc.engine.exposure",
                    "roomcalc.engine.planner")


def test_front_ends_do_not_assemble_the_pipeline():
    # The command line and the interface call roomcalc.study; neither runs the steps itself.
    files = [PKG / "cli.py"] + _modules("tui")
    bad = []
    for f in files:
        for mod, name, line in _imported_names(f):
            if (mod, name) in PIPELINE or mod.startswith(PIPELINE_MODULES):
                bad.append(f"{f.relative_to(PKG)}:{line} imports {name} from {mod}")
    assert not bad, bad


def test_pipeline_rule_catches_a_front_end_that_evaluates(tmp_path):
    # The scan above must be able to fail: a front end importing evaluate is caught.
    f = tmp_path / "front.py"
    f.write_text("from roomcalc.engine.analysis import evaluate\n", encoding="utf-8")
    assert [(m, n) for m, n, _ in _imported_names(f) if (m, n) in PIPELINE] == \
        [("roomcalc.engine.analysis", "evaluate")]
