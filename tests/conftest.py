"""Test set-up: Qt runs offscreen (no display needed); the user's config and cache are not touched."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402


@pytest.fixture(autouse=True)
def _private_dirs(tmp_path_factory, monkeypatch):
    base = tmp_path_factory.getbasetemp()
    monkeypatch.setenv("XDG_CACHE_HOME", str(base / "xdg-cache"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(base / "xdg-config"))
