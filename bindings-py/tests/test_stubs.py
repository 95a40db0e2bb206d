"""The type stubs (python/stillsky/*.pyi) agree with the installed module: mypy's stubtest
imports `stillsky` and compares every name, signature and default it finds at run time with the
stubs. Entries that stubtest cannot judge go in bindings-py/stubtest-allowlist.txt (one pattern
per line, each with a comment saying why), if that file exists.
"""

import pathlib
import subprocess
import sys

ALLOWLIST = pathlib.Path(__file__).resolve().parents[1] / "stubtest-allowlist.txt"


def test_stubs_match_the_built_module():
    cmd = [sys.executable, "-m", "mypy.stubtest", "stillsky"]
    if ALLOWLIST.exists():
        cmd += ["--allowlist", str(ALLOWLIST)]
    r = subprocess.run(cmd, capture_output=True, text=True)
    assert r.returncode == 0, f"{' '.join(cmd)} failed:\n{r.stdout}\n{r.stderr}"
