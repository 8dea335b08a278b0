"""The core is a library: importing it must never load the user interface."""

import subprocess
import sys


def test_core_does_not_import_textual() -> None:
    code = ("import sys, docket.core, docket.core.project, docket.core.report, "
            "docket.core.exporting, docket.core.bulk; "
            "bad = [m for m in sys.modules if m.split('.')[0] in ('textual', 'rich')]; "
            "print(bad); sys.exit(1 if bad else 0)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert done.returncode == 0, done.stdout + done.stderr
