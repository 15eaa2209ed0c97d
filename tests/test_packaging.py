"""The wheel carries the run-time resources: install it apart and run the demo."""

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_wheel_includes_resources_and_runs_demo(tmp_path):
    wheels = tmp_path / "wheels"
    subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(wheels),
                    str(ROOT)], check=True, timeout=600, capture_output=True)
    wheel = next(wheels.glob("shipgui-*.whl"))
    target = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "pip", "install", "--no-deps", "-q", "--target",
                    str(target), str(wheel)], check=True, timeout=300, capture_output=True)
    assert (target / "shipgui" / "resources" / "demo" / "jobs.csv").is_file()
    code = ("import sys; sys.path.insert(0, sys.argv[1]); import shipgui; "
            "assert shipgui.__file__.startswith(sys.argv[1]), shipgui.__file__; "
            "from shipgui.cli import main; sys.exit(main(['demo']))")
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    r = subprocess.run([sys.executable, "-c", code, str(target)], cwd=tmp_path,
                       capture_output=True, text=True, timeout=300, env=env)
    assert r.returncode == 0, r.stderr
    assert "Vehicles needed" in r.stdout
