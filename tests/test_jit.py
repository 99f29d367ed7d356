"""The numba boundary: nothing compiles or imports numba at `import meltzone`; the numba cache never goes inside
the installed package (STYLE pitfalls: a __pycache__ written into site-packages outlives the install)."""

import os
import subprocess
import sys
from pathlib import Path

import meltzone


def _python(code, env=None):
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          env=dict(os.environ) if env is None else env, check=True)


def _without_cache_dir(tmp_path, **extra):
    env = {k: v for k, v in os.environ.items() if k not in ("NUMBA_CACHE_DIR", "XDG_CACHE_HOME")}
    env["HOME"] = str(tmp_path / "home")
    env.update(extra)
    return env


def test_import_does_not_load_numba():
    out = _python("import sys, meltzone, meltzone.cli, meltzone.config, meltzone.melting, meltzone._core.layout; "
                  "print('numba' in sys.modules)").stdout.strip()
    assert out == "False"


def test_kernel_import_compiles_nothing():
    """Importing the kernels defines dispatchers only (no signatures until the first call)."""
    code = ("from meltzone._core import loop, structure, physics; "
            "print(len(loop.integrate.signatures) + len(structure.integrate_inward.signatures)"
            " + len(physics.profile_at.signatures))")
    assert _python(code).stdout.strip() == "0"


def test_cache_goes_to_the_per_user_folder_never_into_the_package(tmp_path):
    """With NUMBA_CACHE_DIR unset, a small run writes its cache under
    $XDG_CACHE_HOME/meltzone/numba-<version>-<hash of the core sources> and no *.nbi / *.nbc anywhere under the
    package folder."""
    package = Path(meltzone.__file__).parent
    before = {p for p in package.rglob("*.nb[ic]")}
    cache = tmp_path / "xdg"
    code = ("import meltzone; r = meltzone.evolve(mass_earth=1.0, end_time_gyr=1e-6, mantle_nodes=32, "
            "integration_steps=200); import os; print(os.environ['NUMBA_CACHE_DIR'])")
    out = _python(code, _without_cache_dir(tmp_path, XDG_CACHE_HOME=str(cache))).stdout.strip()
    from meltzone._core._jit import _sources_hash

    assert out == str(cache / "meltzone" / f"numba-{meltzone.__version__}-{_sources_hash()}")
    assert {p for p in package.rglob("*.nb[ic]")} == before == set()
    assert any(Path(out).rglob("loop.integrate-*.nbi"))
    assert any(Path(out).rglob("*.nbc"))


def test_cache_folder_without_xdg_and_when_unwritable(tmp_path):
    """Without XDG_CACHE_HOME the cache goes to ~/.cache/meltzone/numba-<version>-<hash>; when that cannot be made
    (HOME is a file), to a temporary folder; never the package."""
    code = "import meltzone._core._jit as j; print(j.CACHE_DIR)"
    from meltzone._core._jit import _sources_hash

    home = _python(code, _without_cache_dir(tmp_path)).stdout.strip()
    assert home == str(tmp_path / "home" / ".cache" / "meltzone" / f"numba-{meltzone.__version__}-{_sources_hash()}")
    blocked = tmp_path / "file"
    blocked.write_text("")
    temp = _python(code, _without_cache_dir(tmp_path, HOME=str(blocked))).stdout.strip()
    assert not temp.startswith(str(blocked)) and os.access(temp, os.W_OK)
    assert not temp.startswith(str(Path(meltzone.__file__).parent))


def test_cache_folder_changes_with_the_core_sources(tmp_path, monkeypatch):
    """numba's cache does not notice an edit to a callee in another file (common practice: key the cache folder
    on the sources); the default folder's name carries a hash of the core package's files."""
    from meltzone._core import _jit

    before = _jit._sources_hash()
    fake = tmp_path / "_core"
    fake.mkdir()
    for path in Path(_jit.__file__).parent.glob("*.py"):
        (fake / path.name).write_bytes(path.read_bytes())
    (fake / "physics.py").write_bytes((fake / "physics.py").read_bytes() + b"\n# edited\n")
    monkeypatch.setattr(_jit, "__file__", str(fake / "_jit.py"))
    assert _jit._sources_hash() != before



def _array_like(fn, name):
    """Whether parameter ``name`` of the function node ``fn`` is used as an array: indexed by something other
    than a literal (a tuple of floats is indexed by literals), or asked for its shape."""
    import ast

    for node in ast.walk(fn):
        if isinstance(node, ast.Subscript) and isinstance(node.value, ast.Name) and node.value.id == name \
                and not isinstance(node.slice, ast.Constant):
            return True
        if isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name) and node.value.id == name \
                and node.attr in ("shape", "size", "ndim", "sum"):
            return True
    return False


def test_leaf_kernels_return_no_array_argument():
    """A kernel compiled without reference counting (meltzone._core._jit, ``leaf=True``) must not hand back one
    of its array arguments: the caller would then hold a reference it did not count (numba's memory model; common
    practice). Numba itself refuses an allocation or a returned slice in such a kernel (checked by hand); this
    checks the source of every leaf kernel: no return value (or element of a returned tuple) is a parameter used
    as an array. An alias (b = a; return b) is not caught."""
    import ast

    core = Path(meltzone.__file__).parent / "_core"
    leaves = 0
    for path in sorted(core.glob("*.py")):
        for fn in ast.parse(path.read_text()).body:
            if not isinstance(fn, ast.FunctionDef) or not any(
                    isinstance(d, ast.Call) and any(k.arg == "leaf" for k in d.keywords) for d in fn.decorator_list):
                continue
            leaves += 1
            params = {a.arg for a in fn.args.args}
            for node in ast.walk(fn):
                if isinstance(node, ast.Return) and node.value is not None:
                    values = node.value.elts if isinstance(node.value, ast.Tuple) else [node.value]
                    for v in values:
                        bad = isinstance(v, ast.Name) and v.id in params and _array_like(fn, v.id)
                        assert not bad, f"{path.name}:{node.lineno} {fn.name} returns its array {v.id}"
    assert leaves >= 100
