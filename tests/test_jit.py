"""The numba boundary: nothing compiles or imports numba at `import meltzone`; the cache falls back when
the package folder is read-only (STYLE pitfalls: "no locator available")."""

import os
import subprocess
import sys


def _python(code, **env):
    full = dict(os.environ)
    full.update(env)
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=full, check=True)


def test_import_does_not_load_numba():
    out = _python("import sys, meltzone, meltzone.cli, meltzone.config, meltzone.melting; "
                  "print('numba' in sys.modules)").stdout.strip()
    assert out == "False"


def test_kernel_import_compiles_nothing():
    """Importing the kernels defines dispatchers only (no signatures until the first call)."""
    code = ("from meltzone.evolution import kernel as k; from meltzone import _structure_kernel as s; "
            "print(len(k.integrate.signatures) + len(s.integrate_inward.signatures))")
    assert _python(code).stdout.strip() == "0"


def test_cache_dir_fallback_when_package_is_read_only(tmp_path):
    """With NUMBA_CACHE_DIR unset and the package folder not writable, _jit picks a writable folder."""
    code = (
        "import os\n"
        "os.environ.pop('NUMBA_CACHE_DIR', None)\n"
        "real = os.access\n"
        "import meltzone\n"
        "pkg = os.path.dirname(meltzone.__file__)\n"
        "os.access = lambda p, m: False if os.path.abspath(p) == pkg else real(p, m)\n"
        "import meltzone._jit as j\n"
        "d = os.environ['NUMBA_CACHE_DIR']\n"
        "print(d != pkg and real(d, os.W_OK))\n"
    )
    env = {k: v for k, v in os.environ.items() if k != "NUMBA_CACHE_DIR"}
    env["HOME"] = str(tmp_path)
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, check=True)
    assert res.stdout.strip() == "True"
