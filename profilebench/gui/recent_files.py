"""The recently opened or saved project files, kept in the settings and listed in a menu."""

from __future__ import annotations

from pathlib import Path

__all__ = ["RecentFiles", "MAX_RECENT"]

MAX_RECENT = 8
SETTING = "recent_files"


class RecentFiles:
    """The newest ``MAX_RECENT`` project paths in ``settings`` (a QSettings), shown in ``menu``
    (a QMenu); choosing one calls ``open_path(path)``."""

    def __init__(self, settings, menu, open_path):
        self.settings = settings
        self.menu = menu
        self.open_path = open_path
        self.refresh()

    def paths(self) -> list[str]:
        """The remembered paths, newest first."""
        value = self.settings.value(SETTING, [])
        if isinstance(value, str):  # QSettings gives one entry as a plain string
            value = [value]
        return [str(v) for v in (value or [])]

    def add(self, path) -> None:
        """Put ``path`` (made absolute) first."""
        path = str(Path(path).resolve())
        files = [p for p in self.paths() if p != path]
        files.insert(0, path)
        self.settings.setValue(SETTING, files[:MAX_RECENT])
        self.settings.sync()
        self.refresh()

    def refresh(self) -> None:
        """List the remembered paths in the menu (disabled when there are none)."""
        self.menu.clear()
        paths = self.paths()
        for p in paths:
            act = self.menu.addAction(p)
            act.triggered.connect(lambda _=False, path=p: self.open_path(path))
        self.menu.setEnabled(bool(paths))
