"""Every package folder is installed: a folder left out of pyproject's list works in an editable
checkout and fails after a plain `pip install .` (the README's own command)."""

from pathlib import Path

import pytest

tomllib = pytest.importorskip("tomllib")

ROOT = Path(__file__).resolve().parent.parent


def _declared() -> set[str]:
    with open(ROOT / "pyproject.toml", "rb") as fh:
        return set(tomllib.load(fh)["tool"]["setuptools"]["packages"])


def _on_disk() -> set[str]:
    found = set()
    for top, name in (("speccheck", "speccheck"), ("rules", "speccheck.rules")):
        for init in (ROOT / top).rglob("__init__.py"):
            rel = init.parent.relative_to(ROOT / top).parts
            found.add(".".join((name, *rel)))
    return found


def test_every_package_folder_is_installed():
    assert _on_disk() - _declared() == set()


def test_every_declared_package_exists():
    assert _declared() - _on_disk() == set()
