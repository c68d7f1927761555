"""The git filter that stores notebooks without their outputs (tools/strip_notebook_outputs.py)."""

import copy
import importlib.util
import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = ROOT / "tools" / "strip_notebook_outputs.py"
NOTEBOOKS = sorted((ROOT / "notebooks").glob("*.ipynb"))


def _module():
    spec = importlib.util.spec_from_file_location("strip_notebook_outputs", SCRIPT)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _ran(notebook: dict) -> dict:
    """The notebook as JupyterLab saves it after Run All: outputs, counts, widget state."""
    ran = copy.deepcopy(notebook)
    count = 0
    for cell in ran["cells"]:
        if cell["cell_type"] != "code":
            continue
        count += 1
        cell["execution_count"] = count
        cell["metadata"]["execution"] = {"iopub.status.busy": "2026-01-05T10:00:00.000Z"}
        cell["outputs"] = [
            {"name": "stdout", "output_type": "stream", "text": ["k20 = 7.6e-10 m/s\n"]},
            {
                "data": {
                    "application/vnd.jupyter.widget-view+json": {
                        "model_id": "5f0c2a",
                        "version_major": 2,
                        "version_minor": 0,
                    },
                    "text/plain": ["VBox(children=(...))"],
                },
                "execution_count": count,
                "metadata": {},
                "output_type": "execute_result",
            },
        ]
    ran["metadata"]["widgets"] = {
        "application/vnd.jupyter.widget-state+json": {"state": {"5f0c2a": {"model_name": "x"}}}
    }
    ran["metadata"]["language_info"] = {
        "name": "python",
        "version": "3.11.7",
        "mimetype": "text/x-python",
        "codemirror_mode": {"name": "ipython", "version": 3},
    }
    return ran


def _filter(text: str) -> str:
    done = subprocess.run(
        [sys.executable, str(SCRIPT)], input=text.encode(), capture_output=True, check=True
    )
    return done.stdout.decode("utf-8")


@pytest.mark.parametrize("path", NOTEBOOKS, ids=lambda p: p.stem)
def test_a_ran_notebook_comes_out_as_committed(path):
    committed = path.read_text(encoding="utf-8")
    ran = json.dumps(_ran(json.loads(committed)), indent=1, ensure_ascii=False) + "\n"
    assert "k20 = 7.6e-10" in ran and ran != committed
    assert _filter(ran) == committed
    assert _filter(committed) == committed  # a clean notebook is left byte for byte


def test_what_is_kept_and_what_goes():
    strip = _module().strip_outputs
    notebook = _ran(json.loads(NOTEBOOKS[0].read_text(encoding="utf-8")))
    notebook["cells"][1]["metadata"]["tags"] = ["parameters"]
    clean = strip(notebook)
    code = [cell for cell in clean["cells"] if cell["cell_type"] == "code"]
    assert all(cell["outputs"] == [] and cell["execution_count"] is None for cell in code)
    assert clean["cells"][1]["metadata"] == {"tags": ["parameters"]}
    assert "widgets" not in clean["metadata"]
    assert clean["metadata"]["language_info"] == {"name": "python"}
    assert [c["source"] for c in clean["cells"]] == [c["source"] for c in notebook["cells"]]
    assert "outputs" in notebook["cells"][1] and notebook["cells"][1]["outputs"]  # not mutated


def test_text_that_is_not_a_notebook_passes_through():
    conflict = '<<<<<<< ours\n{"cells": []}\n=======\n{"cells": [1]}\n>>>>>>> theirs\n'
    assert _filter(conflict) == conflict
    assert _filter('{"a": 1}') == '{"a": 1}'


@pytest.mark.skipif(shutil.which("git") is None, reason="needs git")
def test_git_sees_a_ran_notebook_as_unchanged(tmp_path):
    """With the filter configured as `make git-filter` does, running a notebook leaves the
    working tree clean; the committed file holds no output."""

    def git(*args):
        return subprocess.run(
            ["git", "-C", str(tmp_path), *args], capture_output=True, text=True, check=True
        ).stdout

    git("init", "-q")
    git("config", "user.email", "lab@example.invalid")
    git("config", "user.name", "Lab")
    command = f'"{sys.executable}" tools/strip_notebook_outputs.py'
    git("config", "filter.strip-notebook-outputs.clean", command)
    (tmp_path / "tools").mkdir()
    shutil.copy2(SCRIPT, tmp_path / "tools" / SCRIPT.name)
    shutil.copy2(ROOT / ".gitattributes", tmp_path / ".gitattributes")
    committed = NOTEBOOKS[1].read_text(encoding="utf-8")
    notebook = tmp_path / "notebook.ipynb"
    ran = json.dumps(_ran(json.loads(committed)), indent=1, ensure_ascii=False) + "\n"
    notebook.write_text(ran, encoding="utf-8")  # first added with its outputs
    git("add", ".")
    git("commit", "-q", "-m", "notebook")
    assert git("show", "HEAD:notebook.ipynb") == committed
    assert git("status", "--porcelain") == ""
    notebook.write_text(ran.replace("7.6e-10", "7.7e-10"), encoding="utf-8")  # run again
    assert git("status", "--porcelain") == ""
    assert git("diff") == ""
