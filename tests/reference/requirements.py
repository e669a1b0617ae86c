# SPDX-License-Identifier: GPL-3.0-or-later
"""What the reference checks need from the Python that runs them.

Imports only the standard library, so a check can call require_modules()
before it imports anything that needs numpy, scipy or PyYAML.
"""

import importlib
import sys


def require_modules():
    """Exit 77 (meson: skipped, not passed) without numpy, scipy's milp, PyYAML."""
    try:
        for name in ("numpy", "yaml"):
            importlib.import_module(name)
        if not hasattr(importlib.import_module("scipy.optimize"), "milp"):
            raise ImportError("scipy.optimize has no milp (scipy >= 1.9 needed)")
    except ImportError as e:
        print("SKIP: this Python (%s) cannot run the reference checks: %s"
              % (sys.executable, e))
        sys.exit(77)
