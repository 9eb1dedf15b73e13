"""Where the command line looks for its config file and keeps its default catalog, on each platform."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from motorlib.cli.options import config_file, default_catalog_dir


# Linux: the XDG Base Directory Specification (freedesktop.org): $XDG_CONFIG_HOME defaults to ~/.config and
# $XDG_DATA_HOME to ~/.local/share. Windows: roaming settings under %APPDATA%, local data under %LOCALAPPDATA%.
# macOS: ~/Library/Application Support for both (common practice for command-line tools, no published source).
@pytest.mark.parametrize(("platform", "env", "config", "catalog"), [
    ("linux", {}, "/h/.config/motorlib/config.toml", "/h/.local/share/motorlib/catalog"),
    ("linux", {"XDG_CONFIG_HOME": "/c", "XDG_DATA_HOME": "/d"}, "/c/motorlib/config.toml", "/d/motorlib/catalog"),
    ("win32", {"APPDATA": "/r", "LOCALAPPDATA": "/l"}, "/r/motorlib/config.toml", "/l/motorlib/catalog"),
    ("darwin", {"XDG_CONFIG_HOME": "/c"}, "/h/Library/Application Support/motorlib/config.toml",
     "/h/Library/Application Support/motorlib/catalog"),
])
def test_user_folders(monkeypatch: pytest.MonkeyPatch, platform: str, env: dict[str, str], config: str,
                      catalog: str) -> None:
    monkeypatch.setattr(sys, "platform", platform)
    monkeypatch.setenv("HOME", "/h")
    for name in ("XDG_CONFIG_HOME", "XDG_DATA_HOME", "APPDATA", "LOCALAPPDATA"):
        monkeypatch.delenv(name, raising=False)
    for name, value in env.items():
        monkeypatch.setenv(name, value)
    assert config_file() == Path(config) and Path(default_catalog_dir()) == Path(catalog)
