"""The Typer application object and the entry point that turns ZooError into one line."""

from __future__ import annotations

import inspect
import re
from typing import Annotated, Any

import typer
from typer.core import TyperGroup

from zoo.errors import LimitExceeded, NotInCatalog, QuerySyntaxError, ZooError


class PlainParameterError(typer.BadParameter):
    """A bad option value said plainly: ``--format must be one of table, json; got 'xml'``."""

    def format_message(self) -> str:
        return self.message


# Typer checks option values with pydantic, whose messages read "Value error, 'xml' is not one
# of 'table', 'json'." or "Input should be greater than or equal to 1".
_CHOICE = re.compile(r"^(?:Value error, )?(?P<got>.+) is not one of (?P<choices>.+?)\.?$")
_AT_LEAST = re.compile(r"^Input should be greater than or equal to (?P<bound>-?\d+)$")
_AT_MOST = re.compile(r"^Input should be less than or equal to (?P<bound>-?\d+)$")
_INTEGER = re.compile(r"^Input should be a valid integer")


def plain_parameter_message(error: typer.BadParameter) -> str | None:
    """The rule a bad option value breaks, named plainly, or None for messages left as they are.

    ``--format must be one of table, json; got 'xml'``; ``--state-limit must be at least 1;
    got '0'``. The value comes from the validation error typer raised from, when there is one.
    """
    param = error.param
    if param is None:
        return None
    names = [o for o in getattr(param, "opts", ()) if o.startswith("--")]
    name = names[0] if names else (param.metavar or param.name or "the value")
    message = str(error.message)
    got = _invalid_input(error)
    choice = _CHOICE.match(message)
    if choice:
        options = ", ".join(c.strip().strip("'\"") for c in choice.group("choices").split(","))
        return f"{name} must be one of {options}; got {choice.group('got')}"
    shown = "" if got is None else f"; got {got!r}"
    if (bound := _AT_LEAST.match(message)) is not None:
        return f"{name} must be at least {bound.group('bound')}{shown}"
    if (bound := _AT_MOST.match(message)) is not None:
        return f"{name} must be at most {bound.group('bound')}{shown}"
    if _INTEGER.match(message):
        return f"{name} must be a whole number{shown}"
    return None


def _invalid_input(error: BaseException) -> str | None:
    cause = error.__cause__
    errors = getattr(cause, "errors", None)
    if not callable(errors):
        return None
    try:
        found = errors()
    except Exception:  # noqa: BLE001  (a foreign error object: fall back to no value)
        return None
    if found and isinstance(found[0], dict) and "input" in found[0]:
        return str(found[0]["input"])
    return None


def unwrapped_help(text: str | None) -> str | None:
    """Help text with each paragraph on one line, so that the terminal, not the docstring, wraps.

    Typer keeps the single line breaks of every paragraph after the first, which would show the
    docstrings' source line breaks in the middle of ``--help`` lines. A paragraph starting with
    click's ``\\b`` marker keeps its lines.
    """
    if not text:
        return text
    paragraphs = inspect.cleandoc(text).split("\n\n")
    return "\n\n".join(
        p if p.startswith("\b") else " ".join(line.strip() for line in p.splitlines())
        for p in paragraphs
    )


def _hide_flag_type(option: Any) -> None:
    """--help takes no value: show no ``<bool>`` type for it (an empty metavar, as on our flags)."""
    if option is not None and option.metavar is None:
        option.metavar = ""


#: Metavars of arguments that take ONE reference, which may be written in several words
#: (``4 2 2 3``): their usage line must not promise several (``PARAMS|ID...``).
ONE_REFERENCE_METAVARS = frozenset({"PARAMS|ID", "ID"})


def _say_one_reference(param: Any) -> None:
    """Usage lines in the POSIX form: ``P1 P2``, ``[QUERY]``, ``FILE...``, ``PARAMS|ID``.

    Typer writes a required argument in braces (``{P1}``), which in a usage line means "one of
    these", and ``{PARAMS|ID}...`` for an argument that reads ONE reference from several words,
    which promises several; an argument is shown in capitals, in brackets when optional, with
    ``...`` only when it really takes several values.
    """
    if getattr(param, "param_type_name", "") != "argument":
        return
    name = str(param.metavar or param.name or "").upper()
    several = getattr(param, "nargs", 1) != 1 and name not in ONE_REFERENCE_METAVARS
    shown = name + ("..." if several else "")
    shown = shown if param.required else f"[{shown}]"
    param._usage_display_name = lambda: shown


class ZooGroup(TyperGroup):
    """The command group of zoo: typer's, with bad option values reported plainly (one place)
    and help paragraphs unwrapped."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        super().__init__(*args, **kwargs)
        self.help = unwrapped_help(self.help)
        for command in self.commands.values():
            command.help = unwrapped_help(command.help)

    def get_command(self, ctx: Any, cmd_name: str) -> Any:
        command = super().get_command(ctx, cmd_name)
        if command is not None:
            _hide_flag_type(command.get_help_option(ctx))
            if command.epilog is None:
                command.epilog = _EPILOG
            for param in command.params:
                _say_one_reference(param)
        return command

    def get_help_option(self, ctx: Any) -> Any:
        option = super().get_help_option(ctx)
        _hide_flag_type(option)
        return option

    def get_params(self, ctx: Any) -> Any:
        params = super().get_params(ctx)
        for param in params:  # --install-completion and --show-completion take no value
            if getattr(param, "is_flag", False):
                _hide_flag_type(param)
        return params

    def invoke(self, ctx: Any) -> Any:
        try:
            return super().invoke(ctx)
        except PlainParameterError:
            raise
        except typer.BadParameter as error:
            plain = plain_parameter_message(error)
            if plain is None:
                raise
            raise PlainParameterError(plain, ctx=error.ctx, param=error.param) from None


#: Exit status of a user error that has no status of its own (bad input, unreadable file, ...).
USER_ERROR = 1
#: Exit status of a command-line usage error (unknown option, missing argument), as click's.
USAGE_ERROR = 2
#: Exit status when an identifier, parameter set or area is not in the catalog.
NOT_FOUND = 3
#: Exit status of ``zoo identify`` when a net it read is not a cycloid system.
NOT_A_CYCLOID = 4
#: Exit status when a size limit stops a command (--state-limit, the net or canonical limit).
LIMIT_EXCEEDED = 5
#: Exit status after Ctrl-C (128 + SIGINT, common practice for shells).
INTERRUPTED = 130

#: Every exit status with its meaning, in the order of the ``--help`` epilog and the docs.
EXIT_STATUSES: tuple[tuple[int, str], ...] = (
    (0, "success"),
    (USER_ERROR, "error in the input"),
    (USAGE_ERROR, "usage error"),
    (NOT_FOUND, "not found in the catalog"),
    (NOT_A_CYCLOID, "not a cycloid (identify)"),
    (LIMIT_EXCEEDED, "limit exceeded"),
    (INTERRUPTED, "interrupted"),
)

_EPILOG = "Exit status: " + ", ".join(f"{code} {meaning}" for code, meaning in EXIT_STATUSES) + "."


def exit_status(problem: str | BaseException) -> int:
    """The exit status of an error: its own for "not found" and "limit exceeded", else 1."""
    if isinstance(problem, NotInCatalog):
        return NOT_FOUND
    if isinstance(problem, LimitExceeded):
        return LIMIT_EXCEEDED
    return USER_ERROR


def _show_version(value: bool) -> None:
    if value:
        from zoo.version import __version__

        typer.echo(f"zoo {__version__}")
        raise typer.Exit()


app = typer.Typer(
    cls=ZooGroup,
    name="zoo",
    help="A research catalog of Petri's cycloids C(alpha, beta, gamma, delta).",
    epilog=_EPILOG,
    no_args_is_help=True,
    add_completion=True,  # --install-completion and --show-completion for bash, zsh, fish
    pretty_exceptions_enable=False,
)


def fail(problem: str | ZooError, status: int | None = None) -> typer.Exit:
    """Print ``Error: ...`` on standard error and return the exit to raise: ``raise fail(...)``.

    The one way every command reports an error. A query syntax error also gets the query with
    a caret under the offending text. The status is the error's own (``exit_status``) unless
    given. The exit works both under typer's test runner and under ``main`` (which runs the app
    outside standalone mode and exits with the returned status).
    """
    print_error(problem)
    return typer.Exit(exit_status(problem) if status is None else status)


def print_error(problem: str | ZooError) -> None:
    """Print ``Error: ...`` (and a query's caret line) without exiting, for a batch that goes on."""
    typer.echo(f"Error: {problem}", err=True)
    if isinstance(problem, QuerySyntaxError) and problem.query:
        typer.echo(problem.caret_text(), err=True)


@app.callback(epilog=_EPILOG)
def _root(
    version: Annotated[
        bool,
        typer.Option(
            "--version",
            metavar="",
            is_eager=True,
            callback=_show_version,
            help="Print the zoo version and exit.",
        ),
    ] = False,
) -> None:
    """A research catalog of Petri's cycloids C(alpha, beta, gamma, delta)."""
