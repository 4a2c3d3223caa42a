import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def run_cli(*args, cwd=None, input_text=None, env_extra=None):
    """Run `python -m clusterexp ...` from the checkout; returns the CompletedProcess."""
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env.update(env_extra or {})
    return subprocess.run([sys.executable, "-m", "clusterexp", *args], cwd=cwd or ROOT, env=env,
                          capture_output=True, text=True, input=input_text, timeout=300)


@pytest.fixture
def cli():
    return run_cli
