"""The wheel works anywhere: built from this tree, installed into a clean virtual
environment, it runs the headless commands from a folder outside the source
tree and opens the window on its bundled sample.

The new environment reuses this one's dependencies (numpy, cvxopt, Qt, ...)
through a path file, so the test needs no network; the editable install of
this tree is not visible in it (path files of an added folder are not run).
"""

import json
import os
import shutil
import subprocess
import sys
import sysconfig
import venv
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
pytestmark = pytest.mark.timeout(600)


SKIP = shutil.ignore_patterns(".venv", ".git", "build", "*.egg-info", "__pycache__",
                              ".pytest_cache", ".hypothesis", "tests")


@pytest.fixture(scope="module")
def wheel(tmp_path_factory):
    # built from a copy, so setuptools' build/ folder never lands in the checkout
    source = tmp_path_factory.mktemp("source") / "slackline"
    shutil.copytree(ROOT, source, ignore=SKIP, symlinks=True)
    out = tmp_path_factory.mktemp("wheel")
    subprocess.run([sys.executable, "-m", "build", "--wheel", "--outdir", str(out), str(source)],
                   check=True, capture_output=True, text=True)
    (path,) = out.glob("slackline-*.whl")
    return path


@pytest.fixture(scope="module")
def installed(wheel, tmp_path_factory):
    """(bin folder, environment) of a fresh venv with the wheel installed."""
    home = tmp_path_factory.mktemp("clean-venv")
    venv.create(home, with_pip=True)
    bin_dir = home / "bin"
    python = bin_dir / "python"
    site = subprocess.run([python, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                          check=True, capture_output=True, text=True).stdout.strip()
    ours = sysconfig.get_paths()["purelib"]          # this environment's dependencies
    Path(site, "_reuse_test_dependencies.pth").write_text(ours + "\n")
    subprocess.run([python, "-m", "pip", "install", "--quiet", "--no-deps", "--no-index",
                    str(wheel)], check=True, capture_output=True, text=True)
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "VIRTUAL_ENV")}
    env["QT_QPA_PLATFORM"] = "offscreen"
    return bin_dir, env


def _run(installed, args, cwd):
    bin_dir, env = installed
    return subprocess.run([str(bin_dir / "slackline"), *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


def _installed_python(installed, code, cwd):
    bin_dir, env = installed
    return subprocess.run([str(bin_dir / "python"), "-c", code], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


def test_the_wheel_carries_the_three_layers_and_the_bundled_files(wheel):
    names = zipfile.ZipFile(wheel).namelist()
    tops = {name.split("/")[0] for name in names if not name.startswith("slackline-")}
    assert tops == {"solver", "cli", "app"}
    assert "solver/resources/experiment.schema.json" in names
    assert "solver/resources/palette.json" in names
    assert "solver/samples/1-pilot-batch-gauges.experiment.json" in names
    assert not any(name.startswith("tests/") for name in names)


def test_the_installed_copy_is_not_the_source_tree(installed, tmp_path):
    out = _installed_python(installed, "import solver; print(solver.__file__)", tmp_path)
    assert out.returncode == 0, out.stderr
    assert not Path(out.stdout.strip()).is_relative_to(ROOT)


def test_fit_check_export_and_render_run_from_any_folder(installed, tmp_path):
    where = _installed_python(
        installed, "from solver.files import bundled; print(bundled.sample('1-pilot-batch-gauges.csv'))",
        tmp_path)
    table = where.stdout.strip()
    assert not Path(table).is_relative_to(ROOT)
    fitted = _run(installed, ["fit", table, "--positive", "pass", "--json", "--save", "exp.json"],
                  tmp_path)
    assert fitted.returncode == 0, fitted.stderr
    assert json.loads(fitted.stdout)["w"] is not None
    checked = _run(installed, ["check", "exp.json"], tmp_path)
    assert checked.returncode == 0, checked.stdout + checked.stderr
    exported = _run(installed, ["export", "exp.json", "--points", "points.csv"], tmp_path)
    assert exported.returncode == 0, exported.stderr
    assert (tmp_path / "points.csv").read_text().count("\n") == 45   # header + 44 points
    rendered = _run(installed, ["render", "exp.json", "-o", "figure.png"], tmp_path)
    assert rendered.returncode == 0, rendered.stderr
    assert (tmp_path / "figure.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_the_window_opens_on_the_bundled_sample(installed, tmp_path):
    code = ("from PySide6.QtWidgets import QApplication\n"
            "app = QApplication([])\n"
            "from app.window.launch import first_sample\n"
            "from app.window.main_window import MainWindow\n"
            "window = MainWindow(quiet=True)\n"
            "window.files.open_path(first_sample())\n"
            "print(len(window.document.X), first_sample().name)\n"
            "window.document.shutdown()\n")
    out = _installed_python(installed, code, tmp_path)
    assert out.returncode == 0, out.stderr
    assert out.stdout.split() == ["44", "1-pilot-batch-gauges.experiment.json"]


# -- the compiled RBF pair steps from an installed copy (issue 13) ------------------

RBF_FIT = ["--positive", "in pattern", "--kernel", "rbf", "--gamma", "1", "--C", "10",
           "--scale", "zscore", "--json"]


def _respecting_permissions():
    """A command prefix under which file permissions hold (root ignores them), or None."""
    if not hasattr(os, "geteuid") or os.geteuid() != 0:
        return []
    setpriv = shutil.which("setpriv")
    if setpriv is None:
        return None
    drop = "-dac_override,-dac_read_search"
    return [setpriv, f"--bounding-set={drop}", f"--inh-caps={drop}"]


def _writable(folder: Path, on: bool):
    for path in [folder, *folder.rglob("*")]:
        if not path.is_symlink():
            mode = path.stat().st_mode
            path.chmod(mode | 0o200 if on else mode & ~0o222)


@pytest.fixture(scope="module")
def read_only_install(wheel, tmp_path_factory):
    """(slackline, its solver folder) of another clean venv whose installed files cannot be written."""
    prefix = _respecting_permissions()
    if prefix is None:
        pytest.skip("running as root without setpriv: read-only folders cannot be simulated")
    home = tmp_path_factory.mktemp("read-only-venv")
    venv.create(home, with_pip=True)
    python = home / "bin" / "python"
    site = Path(subprocess.run([python, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                               check=True, capture_output=True, text=True).stdout.strip())
    (site / "_reuse_test_dependencies.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
    subprocess.run([python, "-m", "pip", "install", "--quiet", "--no-deps", "--no-index",
                    "--no-compile", str(wheel)], check=True, capture_output=True, text=True)
    _writable(site / "solver", False)
    yield prefix + [str(home / "bin" / "slackline")], site / "solver"
    _writable(site / "solver", True)


def _rbf_fit(command, table, cwd, home):
    env = {k: v for k, v in os.environ.items()
           if k not in ("PYTHONPATH", "VIRTUAL_ENV", "NUMBA_CACHE_DIR", "XDG_CACHE_HOME")}
    env.update(HOME=str(home), TMPDIR=str(cwd))
    out = subprocess.run([*command, "fit", str(table), *RBF_FIT], cwd=cwd, env=env,
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    return json.loads(out.stdout)


def _compiled_files(folder: Path):
    return sorted(p.name for p in folder.rglob("smo_core*.nbi"))


def test_an_rbf_fit_runs_from_the_installed_wheel_in_another_folder(installed, tmp_path):
    table = Path(_installed_python(
        installed, "from solver.files import bundled; print(bundled.sample('3-hollow-cone-spray.csv'))",
        tmp_path).stdout.strip())
    result = _rbf_fit([str(installed[0] / "slackline")], table, tmp_path, tmp_path)
    assert result["status"] and len(result["alpha"]) == len(result["status"])


def test_a_read_only_install_keeps_compiled_code_in_the_home_cache(read_only_install, installed,
                                                                   tmp_path):
    command, solver_folder = read_only_install
    table = solver_folder / "samples" / "3-hollow-cone-spray.csv"
    home = tmp_path / "home"
    home.mkdir()
    fitted = _rbf_fit(command, table, tmp_path, home)
    reference = _rbf_fit([str(installed[0] / "slackline")], table, tmp_path, tmp_path)
    assert fitted["decision"] == pytest.approx(reference["decision"], abs=1e-9)
    assert _compiled_files(solver_folder) == []
    assert _compiled_files(home / ".cache")


def test_a_read_only_install_with_a_read_only_home_still_fits(read_only_install, tmp_path):
    command, solver_folder = read_only_install
    home = tmp_path / "locked-home"
    home.mkdir()
    home.chmod(0o555)
    try:
        fitted = _rbf_fit(command, solver_folder / "samples" / "3-hollow-cone-spray.csv",
                          tmp_path, home)
    finally:
        home.chmod(0o755)
    assert fitted["alpha"]
    assert _compiled_files(tmp_path)           # numba was pointed at the temporary folder
