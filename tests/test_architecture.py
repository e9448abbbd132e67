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
    for f in [PKG / "tui" / "document.py", PKG / "tui" / "recovery.py"]:
        for mod, line in _imports(f):
            if mod.split(".")[0] in UI:
                bad.append(f"{f.name}:{line} imports {mod} (it holds no interface)")
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
            ("roomcalc.engine.criteria", "assess"), ("roomcalc.engine.planner", "plan"),
            ("roomcalc.engine.analysis", "distance_curves")}
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
def test_io_does_not_import_study_or_present():
    # io sits below the core without UI (roomcalc.study) and the presentation layer
    # (roomcalc.present): it may import neither, whether or not they exist yet.
    bad = []
    for f in _modules("io"):
        for mod, line in _imports(f):
            if mod.startswith(("roomcalc.study", "roomcalc.present")):
                bad.append(f"io/{f.relative_to(PKG / 'io')}:{line} imports {mod}")
        for node in ast.walk(ast.parse(f.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.module == "roomcalc" and any(
                    a.name in ("study", "present") for a in node.names):
                bad.append(f"io/{f.relative_to(PKG / 'io')}:{node.lineno} imports "
                           "roomcalc.study or roomcalc.present")
    assert not bad, bad


# ----------------------------------------------------------------------------- private names

#: Documented public functions of the standard library whose names begin with an underscore
#: (os._exit: end the process at once, without the interpreter's shutdown).
STDLIB_PUBLIC_UNDERSCORED = {"os._exit"}


def _is_private(name: str) -> bool:
    return name.startswith("_") and not (name.startswith("__") and name.endswith("__"))


def private_imports(source: str) -> list[tuple[int, str]]:
    """Where a module uses another module's underscored (private) name: ``from x import _y``
    or ``from _x import y`` (absolute or relative), or ``m._y`` / ``m.sub._y`` where ``m`` was
    bound by an import statement. Attributes of anything else (``self._x``, a local object)
    are the module's own business and are not looked at."""
    tree = ast.parse(source)
    imported: set[str] = set()
    bad = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            if any(_is_private(part) for part in (node.module or "").split(".")):
                bad.append((node.lineno, f"from {'.' * node.level}{node.module} import ..."))
                continue
            for a in node.names:
                if _is_private(a.name):
                    bad.append((node.lineno, f"from {'.' * node.level}{node.module or ''} "
                                             f"import {a.name}"))
                else:
                    imported.add(a.asname or a.name)
        elif isinstance(node, ast.Import):
            for a in node.names:
                if any(_is_private(part) for part in a.name.split(".")):
                    bad.append((node.lineno, f"import {a.name}"))
                imported.add(a.asname or a.name.split(".")[0])
    for node in ast.walk(tree):
        if isinstance(node, ast.Attribute) and _is_private(node.attr):
            base = node.value
            while isinstance(base, ast.Attribute):
                base = base.value
            if isinstance(base, ast.Name) and base.id in imported \
                    and ast.unparse(node) not in STDLIB_PUBLIC_UNDERSCORED:
                bad.append((node.lineno, f"{ast.unparse(node)}"))
    return sorted(bad)


# Modules allowed to break the rule for now, each with its reason. Remove an entry as soon as
# the module is fixed; add none without a reason.
PRIVATE_IMPORT_ALLOWED: set[str] = set()


def test_no_module_uses_another_modules_private_names():
    bad = []
    for f in sorted(PKG.rglob("*.py")):
        rel = f.relative_to(PKG).as_posix()
        if rel in PRIVATE_IMPORT_ALLOWED:
            continue
        bad += [f"{rel}:{line} {what}" for line, what in
                private_imports(f.read_text(encoding="utf-8"))]
    assert not bad, bad


def test_private_import_scanner_catches_each_form():
    # A synthetic module with one violation of each form, and uses that are allowed.
    src = (
        "import roomcalc.engine.reverb\n"
        "import roomcalc.engine.air as air_mod\n"
        "from roomcalc.engine import field\n"
        "from roomcalc.engine.reverb import _sabine\n"            # 4: private name imported
        "from ._secret import thing\n"                            # 5: private module
        "from . import _helpers\n"                                # 6: private name, relative
        "def f(self, local):\n"
        "    air_mod._iso9613_1(1, 2, 3, 4)\n"                    # 8: attribute of a module
        "    field._check('x', 1)\n"                              # 9: attribute of a module
        "    roomcalc.engine.reverb._eyring(1)\n"                 # 10: through the package
        "    self._own = local._fine\n"                           # allowed: not imports
        "    return field.__name__, field.room_constant\n"        # allowed: dunder, public
    )
    found = private_imports(src)
    assert [line for line, _ in found] == [4, 5, 6, 8, 9, 10], found
    assert private_imports("from roomcalc.engine import reverb\nreverb.sabine(1, 2)\n") == []


def test_every_engine_module_declares_its_public_names():
    import importlib

    bad = []
    for f in _modules("engine"):
        rel = f.relative_to(PKG).as_posix()
        name = "roomcalc." + rel.removesuffix(".py").removesuffix("/__init__").replace("/", ".")
        mod = importlib.import_module(name)
        names = getattr(mod, "__all__", None)
        if names is None:
            bad.append(f"{rel}: no __all__")
            continue
        bad += [f"{rel}: __all__ names {n!r}, which it does not define" for n in names
                if not hasattr(mod, n)]
        bad += [f"{rel}: __all__ names the private {n!r}" for n in names if _is_private(n)]
    assert not bad, bad
