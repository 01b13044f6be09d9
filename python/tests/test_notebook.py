"""The example notebook (examples/own-learner.ipynb), executed headlessly
by nbclient as a user would run it. Outside references: the CLI running
the notebook's experiment with the same learner as a process
(examples/optimist.py through `--learner`) gives the notebook's results
byte for byte; `burnin plot --log` gives its figure's bytes."""

import json
import sys

import pytest

nbformat = pytest.importorskip("nbformat", reason="the notebook test needs nbformat and nbclient")
nbclient = pytest.importorskip("nbclient", reason="the notebook test needs nbformat and nbclient")


def test_the_example_notebook_runs_and_agrees_with_the_cli(cli, repo, tmp_path):
    nb = nbformat.read(repo / "examples" / "own-learner.ipynb", as_version=4)
    nbclient.NotebookClient(nb, timeout=600, kernel_name="python3", resources={"metadata": {"path": str(tmp_path)}}).execute()
    outputs = [o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", [])]
    assert not [o for o in outputs if o.output_type == "error"]
    svgs = [o["data"]["image/svg+xml"] for o in outputs if "image/svg+xml" in o.get("data", {})]
    tables = [o["data"]["text/markdown"] for o in outputs if "text/markdown" in o.get("data", {})]
    assert len(tables) == 1 and all(l in tables[0] for l in ("optimist (class)", "MVP ×0.01", "ucbvi-hoeffding"))
    # The same experiment with the same learner as a process.
    proc = f"{sys.executable} {repo / 'examples' / 'optimist.py'}"
    want = cli("run", "--json", str(tmp_path / "notebook-experiment.json"), "--learner", f"optimist={proc}").stdout
    assert (tmp_path / "notebook-results.json").read_text() == want
    cli("plot", str(tmp_path / "notebook-results.json"), "-o", str(tmp_path / "f.svg"), "--log")
    figure = (tmp_path / "f.svg").read_text()
    assert len(svgs) == 2 and figure in svgs  # the chart, and the results' own inline view
    assert json.loads(want)["learners"][0]["label"] == "optimist (class)"
