"""Optional parts as extras: what is imported is declared, and a missing extra says which.

A missing library is simulated by ``sys.modules[name] = None``, which makes
Python's import system raise ``ImportError`` for it (documented in the
Python reference, "The import system", 5.3.1 The module cache).
"""

from __future__ import annotations

import ast
import importlib.metadata
import re
import subprocess
import sys
import textwrap
import tomllib
from pathlib import Path

import pytest
from click.testing import CliRunner

from spaceframe._optional import EXTRAS, require
from spaceframe.cli import main
from spaceframe.errors import MissingExtraError

from common.model_files import SAMPLE

ROOT = Path(__file__).resolve().parents[1]
MODELS = ROOT / "models"
PROJECT = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]


def _name(requirement: str) -> str:
    """A requirement's project name, normalised as PEP 503 says."""
    return re.sub(r"[-_.]+", "-", re.match(r"[A-Za-z0-9._-]+", requirement).group()).lower()


def _extra(extra: str) -> set[str]:
    """Every project an extra installs, its references to other extras followed."""
    names = set()
    for req in PROJECT["optional-dependencies"][extra]:
        inner = re.fullmatch(r"spaceframe\[([\w,]+)\]", req)
        if inner:
            for e in inner.group(1).split(","):
                names |= _extra(e)
        else:
            names.add(_name(req))
    return names


def _imports(path: Path) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom) and node.level == 0 and node.module:
            out.add(node.module.split(".")[0])
    return out


SOURCES = sorted((ROOT / "spaceframe").rglob("*.py"))


def test_core_dependencies_are_the_audit_s():
    assert {_name(r) for r in PROJECT["dependencies"]} == {"numpy", "scipy", "pymetis", "click",
                                                          "rtoml", "threadpoolctl"}


def test_every_module_imported_is_the_standard_library_core_or_an_extra():
    # importlib.metadata maps an importable top-level name to the projects that provide it
    provides = importlib.metadata.packages_distributions()
    core = {_name(r) for r in PROJECT["dependencies"]}
    for path in SOURCES:
        for top in _imports(path) - set(sys.stdlib_module_names) - {"spaceframe"}:
            projects = {_name(p) for p in provides.get(top, [])}
            assert projects, f"{path.name} imports {top}, which no installed project provides"
            if top in EXTRAS:
                extra = EXTRAS[top][0]
                assert projects & _extra(extra), f"{top} ({projects}) is not in [{extra}]"
            else:
                assert projects & core, f"{path.name} imports {top} ({projects}): not declared"


def test_optional_modules_are_imported_only_through_require():
    for path in SOURCES:
        if path.name == "_optional.py":
            continue
        direct = _imports(path) & set(EXTRAS)
        assert not direct, f"{path.relative_to(ROOT)} imports {direct} directly; use require()"


def test_test_and_all_install_every_extra():
    every = set().union(*(_extra(e) for e in ("pictures", "video", "imports", "batch", "ifc")))
    assert _extra("all") == every and every <= _extra("test")


@pytest.mark.parametrize("module", sorted(EXTRAS))
def test_a_missing_module_names_its_extra(monkeypatch, module):
    extra = EXTRAS[module][0]
    monkeypatch.setitem(sys.modules, module, None)
    with pytest.raises(MissingExtraError) as info:
        require(module)
    assert info.value.extra == extra and info.value.module == module
    assert str(info.value).endswith(f"is not installed; install it with: "
                                    f"pip install 'spaceframe[{extra}]'")


def test_a_missing_submodule_names_its_extra(monkeypatch):
    monkeypatch.setitem(sys.modules, "dask.distributed", None)
    with pytest.raises(MissingExtraError, match=r"'dask'.*pip install 'spaceframe\[batch\]'"):
        require("dask.distributed")


@pytest.fixture
def sample(tmp_path):
    path = tmp_path / "platform.toml"
    path.write_text(SAMPLE, encoding="utf-8")
    return path


@pytest.mark.parametrize("blocked, args, extra", [
    ("pyvista", ("animate", "{model}", "-o", "{tmp}/m.gif"), "pictures"),
    ("PIL", ("animate", "{model}", "-o", "{tmp}/m.png"), "pictures"),
    ("trimesh", ("audit", str(MODELS / "dome_canopy.obj")), "imports"),
    ("trimesh", ("convert", str(MODELS / "dome_canopy.obj"), "-o", "{tmp}/d.toml"), "imports"),
    ("dask", ("batch", "{model}", "-o", "{tmp}/rows.csv"), "batch"),
], ids=lambda v: v if isinstance(v, str) else v[0])
def test_the_command_line_exits_2_naming_the_extra(monkeypatch, tmp_path, sample, blocked, args,
                                                   extra):
    monkeypatch.setitem(sys.modules, blocked, None)
    for name in [m for m in sys.modules if m.startswith(blocked + ".")]:
        monkeypatch.setitem(sys.modules, name, None)
    args = [a.format(model=sample, tmp=tmp_path) for a in args]
    res = CliRunner().invoke(main, args)
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    assert f"need the optional package '{blocked}', which is not installed; install it with: " \
           f"pip install 'spaceframe[{extra}]'" in res.stderr
    assert [p.name for p in tmp_path.iterdir()] == ["platform.toml"]   # nothing written


def test_the_core_commands_run_with_no_extra(tmp_path, sample):
    """In a fresh interpreter where no optional library can be imported."""
    script = textwrap.dedent(f"""
        import sys
        for name in {sorted(EXTRAS)!r}:
            sys.modules[name] = None
        from click.testing import CliRunner
        from spaceframe.cli import main
        model, out = {str(sample)!r}, {str(tmp_path)!r}
        for args in (["audit", model, "--json"], ["brace", model], ["convert", model, "-o",
                     out + "/copy.json"], ["report", model, "-o", out + "/page.html"]):
            res = CliRunner().invoke(main, args)
            print(args[0], res.exit_code)
    """)
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                          timeout=120, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    # the sample (a triangle in y = 0) turns about AB, one rigid-body mode: audit 1; no member
    # or restraint candidate holds C out of the plane unless --attach names it: brace 1;
    # convert and report write their files: 0
    assert done.stdout.split() == ["audit", "1", "brace", "1", "convert", "0", "report", "0"]
    assert (tmp_path / "copy.json").exists() and (tmp_path / "page.html").exists()
