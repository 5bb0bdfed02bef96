"""The pre-commit hooks in .pre-commit-hooks.yaml, checked by the pre-commit framework itself.

Outside reference: pre-commit 4.x (its manifest loader, and `pre-commit try-repo` run on a
temporary git repository holding a small shop).

`fitment-validate` (language: python) makes pre-commit install fitment into a virtualenv of
its own, which downloads fitment's dependencies (PyYAML, pint, numpy, mkdocs...) from the
package index: that cannot work on an offline CI machine, so its try-repo test runs only with
FITMENT_NETWORK_TESTS=1 (about a minute). The offline run checks the same hook definition with
`fitment-validate-installed` (language: system, the fitment already on PATH), which differs
from it only in how pre-commit finds the command.
"""
from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
HOOKS = ROOT / ".pre-commit-hooks.yaml"
GIT_ENV = {"GIT_AUTHOR_NAME": "test", "GIT_AUTHOR_EMAIL": "test@example.invalid",
           "GIT_COMMITTER_NAME": "test", "GIT_COMMITTER_EMAIL": "test@example.invalid",
           "GIT_CONFIG_NOSYSTEM": "1"}

pytestmark = pytest.mark.skipif(shutil.which("git") is None, reason="pre-commit needs git")


def git(folder: Path, *args: str) -> None:
    subprocess.run(["git", "-c", "commit.gpgsign=false", "-c", "init.defaultBranch=main", *args], cwd=folder,
                   check=True, capture_output=True, env={**os.environ, **GIT_ENV})


def repository(folder: Path, files: dict[str, Path]) -> Path:
    """A git repository at `folder` holding copies of `files` (name -> source), committed."""
    folder.mkdir(parents=True)
    git(folder, "init", "-q")
    for name, source in files.items():
        target = folder / name
        target.parent.mkdir(parents=True, exist_ok=True)
        if source.is_dir():
            shutil.copytree(source, target, ignore=shutil.ignore_patterns(
                "__pycache__", "*.egg-info", ".pytest_cache", ".hypothesis"))
        else:
            shutil.copy2(source, target)
    git(folder, "add", "-A")
    git(folder, "commit", "-q", "-m", "files")
    return folder


def small_shop(folder: Path) -> Path:
    """Shop rules, the demo catalogue and three demo builds, in a git repository."""
    builds = sorted((ROOT / "records" / "builds").rglob("*.yaml"))[:3]
    files = {"records/shop.yaml": ROOT / "records" / "shop.yaml", "records/parts": ROOT / "records" / "parts"}
    files |= {f"records/builds/{p.parent.name}/{p.name}": p for p in builds}
    return repository(folder, files)


def try_repo(shop: Path, hook_repo: Path, hook: str, home: Path) -> subprocess.CompletedProcess:
    env = {**os.environ, **GIT_ENV, "PRE_COMMIT_HOME": str(home),
           "PATH": f"{Path(sys.executable).parent}{os.pathsep}{os.environ.get('PATH', '')}"}
    return subprocess.run([sys.executable, "-m", "pre_commit", "try-repo", str(hook_repo), hook, "--all-files"],
                          cwd=shop, capture_output=True, text=True, env=env, timeout=900)


def test_the_hook_manifest_is_valid_for_pre_commit():
    from pre_commit.clientlib import load_manifest

    hooks = {hook["id"]: hook for hook in load_manifest(str(HOOKS))}
    assert set(hooks) == {"fitment-validate", "fitment-validate-installed"}
    for hook in hooks.values():
        assert hook["entry"] == "fitment validate" and hook["pass_filenames"] is False
        assert hook["files"] == "^records/"


def test_try_repo_passes_a_valid_shop_and_fails_a_broken_one(tmp_path):
    hook_repo = repository(tmp_path / "fitment", {".pre-commit-hooks.yaml": HOOKS})
    shop = small_shop(tmp_path / "shop")
    passed = try_repo(shop, hook_repo, "fitment-validate-installed", tmp_path / "home")
    assert passed.returncode == 0, passed.stdout + passed.stderr
    assert "Passed" in passed.stdout

    build = next((shop / "records" / "builds").rglob("*.yaml"))
    text = build.read_text().replace("status: ", "status: finished  # was: ", 1)
    build.write_text(text)
    failed = try_repo(shop, hook_repo, "fitment-validate-installed", tmp_path / "home")
    assert failed.returncode == 1, failed.stdout + failed.stderr
    assert "Failed" in failed.stdout
    relative = build.relative_to(shop).as_posix()
    assert f"{relative}:" in failed.stdout and "status: expected one of draft" in failed.stdout


@pytest.mark.skipif(os.environ.get("FITMENT_NETWORK_TESTS") != "1",
                    reason="pre-commit installs fitment's dependencies from the package index; "
                           "set FITMENT_NETWORK_TESTS=1 where it is reachable")
def test_try_repo_installs_and_runs_the_python_hook(tmp_path):
    names = ["pyproject.toml", "README.md", ".pre-commit-hooks.yaml", "builder", "schema", "site_src"]
    hook_repo = repository(tmp_path / "fitment", {name: ROOT / name for name in names})
    shop = small_shop(tmp_path / "shop")
    result = try_repo(shop, hook_repo, "fitment-validate", tmp_path / "home")
    assert result.returncode == 0, result.stdout + result.stderr
    assert "fitment validate" in result.stdout and "Passed" in result.stdout
