"""The wheel carries the run-time resources: install it in a fresh venv and run
the `shipgui` console command on the demo day."""

import os
import site
import subprocess
import sys
import sysconfig
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_wheel_in_fresh_venv_runs_demo(tmp_path):
    wheels = tmp_path / "wheels"
    subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(wheels),
                    str(ROOT)], check=True, timeout=600, capture_output=True)
    wheel = next(wheels.glob("shipgui-*.whl"))
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True, timeout=300)
    py = venv / "bin" / "python"
    # The dependencies come from this environment through a .pth file, so only
    # shipgui itself is installed from the wheel (no network needed).
    purelib = subprocess.run([str(py), "-c", "import sysconfig; print(sysconfig.get_paths()"
                              "['purelib'])"], check=True, capture_output=True,
                             text=True).stdout.strip()
    deps = [p for p in {sysconfig.get_paths()["purelib"], *site.getsitepackages()}
            if Path(p).is_dir()]
    Path(purelib, "host-deps.pth").write_text("\n".join(deps) + "\n")
    subprocess.run([str(py), "-m", "pip", "install", "--no-deps", "-q", str(wheel)],
                   check=True, timeout=300, capture_output=True)
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "DISPLAY")}
    r = subprocess.run([str(venv / "bin" / "shipgui"), "demo"], cwd=tmp_path,
                       capture_output=True, text=True, timeout=300, env=env)
    assert r.returncode == 0, r.stderr
    assert "Vehicles needed" in r.stdout
    where = subprocess.run([str(py), "-c", "import shipgui; print(shipgui.__file__)"],
                           capture_output=True, text=True, cwd=tmp_path, env=env).stdout
    assert where.startswith(str(venv))
    assert (Path(where).parent / "resources" / "demo" / "jobs.csv").is_file()
