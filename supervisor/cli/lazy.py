"""A command group that loads a command family's module only when it is used.

``supervisor --help`` lists every command with its one-line help from a light
table (:data:`Entry`), so no family module (and none of the check, plan, report
or records code behind it) is imported to print the list.  A command's module is
imported, and its click command built by typer exactly as an eager registration
would build it, when the command is invoked or its own ``--help`` is asked.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Iterator, Mapping, MutableMapping
from dataclasses import dataclass
from typing import Any

import typer
from typer.core import TyperCommand, TyperGroup

from supervisor.cli.coercion import speed_up


@dataclass(frozen=True)
class Entry:
    """One top-level command as listed by ``supervisor --help``.

    Parameters
    ----------
    module:
        Dotted name of the family module whose ``register(app)`` adds the command
        (one module may register several commands).
    help:
        The command's help text, at least its first paragraph: the listing's
        one-line help is cut from it exactly as from the loaded command's help.
    """

    module: str
    help: str


class _LazyCommands(MutableMapping[str, Any]):
    """Commands by name: the names come from the table, a command is built on first use."""

    def __init__(self, loaded: Mapping[str, Any], table: Mapping[str, Entry],
                 load: Callable[[str], Mapping[str, Any]]) -> None:
        self._loaded: dict[str, Any] = dict(loaded)
        self._table = table
        self._load = load

    def loaded(self, name: str) -> Any | None:
        """The command if its module is already loaded, else None (loads nothing)."""
        return self._loaded.get(name)

    def __getitem__(self, name: str) -> Any:
        if name not in self._loaded and name in self._table:
            self._loaded.update(self._load(self._table[name].module))
        return self._loaded[name]

    def __setitem__(self, name: str, cmd: Any) -> None:
        self._loaded[name] = cmd

    def __delitem__(self, name: str) -> None:
        del self._loaded[name]

    def __contains__(self, name: object) -> bool:
        return name in self._table or name in self._loaded

    def __iter__(self) -> Iterator[str]:
        yield from self._table
        yield from (n for n in self._loaded if n not in self._table)

    def __len__(self) -> int:
        return sum(1 for _ in self)


def family_commands(module: str, make_app: Callable[[], typer.Typer]) -> dict[str, Any]:
    """Build the click commands a family module registers, as typer builds them.

    Parameters
    ----------
    module:
        Dotted name of a module with a ``register(app: typer.Typer)`` function.
    make_app:
        Makes an application with the root's settings (markup mode, exception
        display), so the commands are built as they would be under the root.

    Returns
    -------
    dict
        The click commands and groups by name, in registration order, their plain
        options converted without pydantic (:mod:`supervisor.cli.coercion`).
    """
    app = make_app()
    importlib.import_module(module).register(app)
    app.callback()(lambda: None)    # always a group, whatever the family registers
    group = typer.main.get_command(app)
    assert isinstance(group, TyperGroup)
    speed_up(group)
    return dict(group.commands)


class LazyGroup(TyperGroup):
    """The root group: commands listed from :attr:`table`, loaded on first use.

    Subclasses set :attr:`table` (name -> :class:`Entry`, in listing order) and
    :attr:`make_app` (an application with the root's settings).
    """

    table: Mapping[str, Entry] = {}
    make_app: Callable[[], typer.Typer]

    def __init__(self, **attrs: Any) -> None:
        super().__init__(**attrs)
        make_app = type(self).make_app
        self.commands = _LazyCommands(self.commands, self.table,
                                      lambda module: family_commands(module, make_app))
        speed_up(self, recurse=False)

    def list_commands(self, ctx: Any) -> list[str]:
        """The command names in listing order (loads nothing)."""
        return list(self.commands)

    def format_commands(self, ctx: Any, formatter: Any) -> None:
        """List the commands with their one-line help without loading any module."""
        commands = self.commands
        assert isinstance(commands, _LazyCommands)
        listed = []
        for name in self.list_commands(ctx):
            cmd = commands.loaded(name)
            if cmd is None:
                cmd = TyperCommand(name, help=self.table[name].help)
            if not cmd.hidden:
                listed.append((name, cmd))
        if listed:
            limit = formatter.width - 6 - max(len(name) for name, _ in listed)
            rows = [(name, cmd.get_short_help_str(limit)) for name, cmd in listed]
            with formatter.section("Commands"):
                formatter.write_dl(rows)
