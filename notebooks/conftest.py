"""When the test suite runs the notebooks (``pytest --nbval-lax notebooks``), they work in a
working folder of their own, made for the run and removed after it: never in the
engineer's ``working/`` beside the notebooks, whose remembered series and working copies
stay as the engineer left them."""

import os
import shutil
import tempfile


def pytest_configure(config):
    folder = tempfile.mkdtemp(prefix="kitchen-working-")
    config.add_cleanup(lambda: shutil.rmtree(folder, ignore_errors=True))
    os.environ["KITCHEN_WORKING_FOLDER"] = folder  # the kernels nbval starts inherit it
