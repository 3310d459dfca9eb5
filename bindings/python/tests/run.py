"""Run the binding's unittest suite; --no-numpy hides NumPy first (an import
block: sys.modules["numpy"] = None makes every `import numpy` fail)."""
import os
import sys
import unittest

here = os.path.dirname(os.path.abspath(__file__))
if "--no-numpy" in sys.argv:
    sys.argv.remove("--no-numpy")
    for name in list(sys.modules):
        if name == "numpy" or name.startswith("numpy."):
            del sys.modules[name]
    sys.modules["numpy"] = None
    os.environ["PSIK_TEST_NO_NUMPY"] = "1"
sys.path.insert(0, os.path.dirname(here))
suite = unittest.defaultTestLoader.discover(here, pattern="test_*.py")
result = unittest.TextTestRunner(verbosity=2).run(suite)
sys.exit(0 if result.wasSuccessful() else 1)
