"""Compiled kernels on a cold cache: first start, threads, where the cache goes.

Each test runs Python in a child process with its own empty numba cache
(``NUMBA_CACHE_DIR`` or ``XDG_CACHE_HOME``), as on a fresh install; they
compile for real, so each takes a few seconds.
"""

import json
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

pytestmark = pytest.mark.skipif(
    os.environ.get("NUMBA_DISABLE_JIT") == "1", reason="about compiled kernels")

# Solves that reach every kernel: one and two classes, a depot, pricing rounds
# by scaling and by repair, trade-off steps, a larger day with many phases.
SOLVES = """
import json, numba
from shipgui.core import Settings, solve_day
from shipgui.core.export.plan_json import plan_to_dict
from shipgui.core.fleet import _flow_kernel, _hk_kernel
from shipgui.core.prepare import kernels_ready
from tests.support.days import random_day, regional_day
ready = kernels_ready()
days = [random_day(60, 5, seed=1), random_day(80, 6, seed=2, classes=2,
        settings=Settings(depot="S0")), regional_day(1500, 60, seed=3)]
plans = [plan_to_dict(solve_day(d, tradeoff=3)) for d in days]
misses = hits = 0
for module in (_hk_kernel, _flow_kernel):
    for value in vars(module).values():
        if isinstance(value, numba.core.dispatcher.Dispatcher):
            misses += sum(value.stats.cache_misses.values())
            hits += sum(value.stats.cache_hits.values())
print(json.dumps({"ready": ready, "misses": misses, "hits": hits,
                  "routes": [p["routes"] for p in plans]}))
"""


def _run(args, env_extra, cwd=ROOT, prefix=()):
    env = {k: v for k, v in os.environ.items()
           if k not in ("NUMBA_CACHE_DIR", "NUMBA_DISABLE_JIT", "DISPLAY")}
    env["PYTHONPATH"] = str(ROOT)
    env.update(env_extra)
    return subprocess.run([*prefix, sys.executable, *args], capture_output=True, text=True,
                          env=env, cwd=cwd, timeout=600)


def test_first_demo_prepares_the_solver_once_and_covers_every_kernel(tmp_path):
    cache = {"NUMBA_CACHE_DIR": str(tmp_path / "cache")}
    first = _run(["-m", "shipgui", "demo"], cache)
    assert first.returncode == 0, first.stderr
    assert first.stderr.count("Preparing the solver") == 1
    assert "Vehicles needed: 28" in first.stdout
    again = _run(["-m", "shipgui", "demo"], cache)
    assert again.returncode == 0 and "Preparing" not in again.stderr
    # The preparation compiled everything any solve needs: nothing compiles now.
    out = _run(["-c", SOLVES], cache)
    assert out.returncode == 0, out.stderr
    result = json.loads(out.stdout.splitlines()[-1])
    assert result["ready"] and result["misses"] == 0 and result["hits"] > 0


def test_four_threads_on_a_cold_cache_get_the_same_answers(tmp_path):
    # numba compiles under its own lock; nothing is patched at run time, so
    # first use from several threads (two solves in the app at once) is safe.
    code = """
import json, threading
from shipgui.core import Settings, solve_day
from shipgui.core.export.plan_json import plan_to_dict
from tests.support.days import random_day
days = [random_day(70, 6, seed=s, settings=Settings(depot="S0") if s % 2 else None)
        for s in range(3)]
barrier = threading.Barrier(4)
results, errors = [None] * 4, []
def work(k):
    try:
        barrier.wait()
        results[k] = [plan_to_dict(solve_day(d, kernel="hopcroft-karp", tradeoff=2))
                      for d in days]
    except Exception as exc:
        errors.append(repr(exc))
threads = [threading.Thread(target=work, args=(k,)) for k in range(4)]
for t in threads: t.start()
for t in threads: t.join()
print(json.dumps({"errors": errors, "results": results}))
"""
    out = _run(["-c", code], {"NUMBA_CACHE_DIR": str(tmp_path / "cache")})
    assert out.returncode == 0, out.stderr
    result = json.loads(out.stdout.splitlines()[-1])
    assert result["errors"] == []
    first = result["results"][0]
    assert all(r == first for r in result["results"][1:])
    assert all(p["verified"] for p in first)
    # The same answers as plain Python gives (an independent run of the kernels).
    plain = _run(["-c", code], {"NUMBA_DISABLE_JIT": "1"})
    assert json.loads(plain.stdout.splitlines()[-1])["results"][0] == first


def _read_only_copy(where: Path) -> Path:
    """A copy of the package that its user cannot write to."""
    package = where / "site" / "shipgui"
    shutil.copytree(ROOT / "shipgui", package,
                    ignore=shutil.ignore_patterns("__pycache__", "*.nbi", "*.nbc"))
    for folder, _, files in os.walk(where / "site"):
        for name in files:
            os.chmod(Path(folder, name), 0o444)
        os.chmod(folder, 0o555)
    return package.parent


def _without_root_override() -> list[str]:
    """A command prefix that takes away root's right to write into read-only
    folders (CI runs as root), keeping the user."""
    if os.geteuid() != 0:
        return []
    setpriv = shutil.which("setpriv")
    if setpriv is None:
        pytest.skip("running as root without setpriv: cannot make a folder read-only")
    return [setpriv, "--bounding-set=-dac_override,-dac_read_search,-fowner"]


def test_cache_goes_to_the_users_cache_folder_when_the_package_is_read_only():
    # A system-wide install or a bundled app: numba's own locator falls back to
    # the user's cache folder ($XDG_CACHE_HOME/numba), so the compile is paid once.
    where = Path(tempfile.mkdtemp(prefix="shipgui-ro-"))
    try:
        os.chmod(where, 0o755)
        site = _read_only_copy(where)
        home = where / "home"
        home.mkdir()
        os.chmod(home, 0o777)
        code = ("import json, shipgui; from shipgui.core import solve_day; "
                "from shipgui.core.demo import load_demo; "
                "from shipgui.core.fleet._hk_kernel import greedy_start as k; "
                "plan = solve_day(load_demo(), least_deadhead=False); "
                "print(json.dumps([shipgui.__file__, plan.vehicles, "
                "sum(k.stats.cache_hits.values()), sum(k.stats.cache_misses.values())]))")
        env = {"PYTHONPATH": str(site), "XDG_CACHE_HOME": str(home / "cache"),
               "HOME": str(home), "PYTHONDONTWRITEBYTECODE": "1"}
        prefix = _without_root_override()
        probe = _run(["-c", f"open({str(site / 'probe')!r}, 'w')"], env, cwd=home, prefix=prefix)
        assert probe.returncode != 0 and "PermissionError" in probe.stderr  # really read-only
        runs = [_run(["-c", code], env, cwd=home, prefix=prefix) for _ in range(2)]
        assert all(r.returncode == 0 for r in runs), runs[0].stderr
        first, second = (json.loads(r.stdout.splitlines()[-1]) for r in runs)
        assert first[0].startswith(str(site)) and first[1] == 28
        assert first[2:] == [0, 1] and second[2:] == [1, 0]  # compiled once, then loaded
        cached = [p.name for p in (home / "cache" / "numba").rglob("*.nbi")]
        assert any(".greedy_start-" in name for name in cached), cached
        assert not list(site.rglob("*.nbi"))
    finally:
        for folder, _, _ in os.walk(where):
            os.chmod(folder, 0o755)
        shutil.rmtree(where, ignore_errors=True)
