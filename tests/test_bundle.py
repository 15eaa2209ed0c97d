"""The desktop bundle (PyInstaller) starts, shows the demo and caches its kernels.

Opt-in (about two minutes): ``python -m pytest -m bundle`` after
``pip install pyinstaller``.  The bundle is built as the spec says, started
on an empty cache (a fresh computer), and compared with the installed package.
"""

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

pytestmark = pytest.mark.bundle


@pytest.fixture(scope="module")
def bundle(tmp_path_factory) -> Path:
    if shutil.which("pyinstaller") is None and not _has_module("PyInstaller"):
        pytest.skip("pyinstaller is not installed (pip install pyinstaller)")
    where = tmp_path_factory.mktemp("bundle")
    subprocess.run([sys.executable, "-m", "PyInstaller", "--noconfirm", "--distpath",
                    str(where / "dist"), "--workpath", str(where / "build"),
                    str(ROOT / "packaging" / "shipgui.spec")], cwd=ROOT, check=True,
                   capture_output=True, timeout=1800)
    app = where / "dist" / "shipgui" / "shipgui"
    assert app.is_file()
    return app


def _has_module(name: str) -> bool:
    import importlib.util
    return importlib.util.find_spec(name) is not None


def _env(home: Path) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items()
           if k not in ("DISPLAY", "WAYLAND_DISPLAY", "NUMBA_CACHE_DIR", "NUMBA_DISABLE_JIT",
                        "PYTHONPATH")}
    env.update(QT_QPA_PLATFORM="offscreen", XDG_CACHE_HOME=str(home / "cache"),
               HOME=str(home))
    return env


def test_bundle_shows_the_demo_and_caches_its_kernels(bundle, tmp_path, capsys):
    shot = tmp_path / "demo.png"
    run = subprocess.run([str(bundle), "--demo", "--screenshot", str(shot)], cwd=tmp_path,
                         env=_env(tmp_path), capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stderr
    assert shot.stat().st_size > 20_000  # a drawn window, not an empty picture
    from PySide6.QtGui import QImage
    image = QImage(str(shot))
    assert (image.width(), image.height()) == (1400, 820)
    # Compiled kernels went to the user's cache folder (a frozen app's package
    # folder is not a place for them), so the next start only loads them.
    cached = {p.name.split("-")[0] for p in (tmp_path / "cache" / "numba").rglob("*.nbi")}
    assert {"_hk_kernel.greedy_start", "_flow_kernel.cost_scaling",
            "_flow_kernel.repair"} <= cached
    size = sum(p.stat().st_size for p in bundle.parent.rglob("*") if p.is_file()
               and not p.is_symlink())
    with capsys.disabled():
        print(f"\nbundle: {size / 1e6:.0f} MB in {bundle.parent}")


def test_bundle_plans_like_the_installed_package(bundle, tmp_path):
    # The same plan as the package gives (compiled kernels, same matching), and
    # the outputs are written: JSON, PDF (reportlab and its fonts), routes workbook.
    out = subprocess.run([str(bundle), "demo", "--json", "plan.json", "--pdf", "plan.pdf",
                          "--routes", "routes.xlsx"], cwd=tmp_path, env=_env(tmp_path),
                         capture_output=True, text=True, timeout=600)
    assert out.returncode == 0, out.stderr
    assert (tmp_path / "plan.pdf").stat().st_size > 10_000
    assert (tmp_path / "routes.xlsx").stat().st_size > 1_000
    bundled = json.loads((tmp_path / "plan.json").read_text())
    from shipgui.core import solve_day
    from shipgui.core.demo import load_demo
    from shipgui.core.export.plan_json import plan_to_dict
    here = plan_to_dict(solve_day(load_demo()))
    assert bundled["routes"] == here["routes"]
    assert bundled["certificate"] == here["certificate"] and bundled["verified"]
