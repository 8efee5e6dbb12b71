"""How the pad's parts are put together: screens get what they need from their caller, and the
figures the typing screen shows are reactive attributes bound to the widgets that draw them.

Textual's data binding (``reactive`` and ``DOMNode.data_bind``) is the library's documented way to
keep a widget showing a value its parent holds; the rules on imports are this project's own
(DEVELOPERS.md, "the interface").
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest
from pilot_steps import paste
from textual.app import App
from textual.reactive import Reactive

from foretype.query.model import LanguageModel
from foretype.tui.screens.pad import PadScreen
from foretype.tui.session import Tally
from foretype.tui.widgets.context_strip import ContextStrip
from foretype.tui.widgets.model_facts import ModelFacts
from foretype.tui.widgets.suggestion_table import SuggestionTable
from foretype.tui.widgets.tally_panel import TallyPanel

TUI = Path(__file__).resolve().parents[2] / "tui"
SCREEN_MODULES = sorted([*(TUI / "screens").glob("*.py"), *(TUI / "dialogs").glob("*.py")])


def _is_type_checking(node: ast.If) -> bool:
    test = node.test
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def imports_outside_type_checking(tree: ast.AST) -> list[str]:
    """Every module a file imports, leaving out the imports under ``if TYPE_CHECKING:``."""
    found: list[str] = []

    def visit(node: ast.AST) -> None:
        for child in ast.iter_child_nodes(node):
            if isinstance(child, ast.If) and _is_type_checking(child):
                continue
            if isinstance(child, ast.ImportFrom):
                found.append("." * child.level + (child.module or ""))
            elif isinstance(child, ast.Import):
                found.extend(alias.name for alias in child.names)
            visit(child)

    visit(tree)
    return found


def attributes_read_from_the_app(tree: ast.AST) -> set[str]:
    """The names read as ``self.app.NAME`` in a file."""
    return {
        node.attr
        for node in ast.walk(tree)
        if isinstance(node, ast.Attribute)
        and isinstance(node.value, ast.Attribute)
        and node.value.attr == "app"
        and isinstance(node.value.value, ast.Name)
        and node.value.value.id == "self"
    }


@pytest.mark.parametrize("path", SCREEN_MODULES, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_no_screen_imports_the_app_except_for_typing(path: Path) -> None:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    imported = imports_outside_type_checking(tree)
    assert not [name for name in imported if name in ("..app", "foretype.tui.app") or name.endswith("tui.app")]


@pytest.mark.parametrize("path", SCREEN_MODULES, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_screens_use_only_textuals_own_app_interface(path: Path) -> None:
    # What a screen needs from the pad (session, model, learned state, folder) comes in through its
    # constructor; what it still asks of self.app is Textual's (bell, call_from_thread, ...).
    tree = ast.parse(path.read_text(encoding="utf-8"))
    assert {name for name in attributes_read_from_the_app(tree) if not hasattr(App, name)} == set()


def test_the_dialogs_have_their_own_package() -> None:
    from foretype.tui.dialogs.confirm_quit import ConfirmQuitDialog
    from foretype.tui.dialogs.save_message import SaveDialog

    assert ConfirmQuitDialog.__module__.startswith("foretype.tui.dialogs.") and SaveDialog.__module__.startswith("foretype.tui.dialogs.")
    assert not list((TUI / "screens").glob("*dialog*")) and not (TUI / "screens" / "confirm_quit.py").exists()


def test_the_learning_question_about_sweep_rows_lives_with_the_sweep_results() -> None:
    import foretype.chart
    import foretype.tui.screens.sweep as sweep_screen
    from foretype.sweep import has_learning

    assert not hasattr(foretype.chart, "has_learning")
    assert sweep_screen.has_learning is has_learning
    assert has_learning([{"vocab_size": 4, "adapted_ksr": 0.5}]) and not has_learning([{"vocab_size": 4, "adapted_ksr": None}])


def test_the_offer_highlight_tally_and_model_are_reactive_attributes_of_the_typing_screen() -> None:
    for name in ("offer", "highlight", "tally", "model"):
        assert isinstance(PadScreen.__dict__.get(name), Reactive), name
    for widget in (ContextStrip, SuggestionTable, TallyPanel, ModelFacts):
        assert not hasattr(widget, "show"), widget.__name__  # nothing is pushed into them


async def test_the_widgets_follow_the_screens_reactive_attributes(make_app, tiny_model: LanguageModel) -> None:
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await paste(pilot, "the ferry ")
        await pilot.press("down")
        screen = app.screen
        assert isinstance(screen, PadScreen)
        offer = app.session.offer
        assert screen.offer is offer and screen.highlight == 1
        assert screen.query_one(ContextStrip).offer is offer
        table = screen.query_one(SuggestionTable)
        assert (table.offer, table.highlight) == (offer, 1)
        assert screen.query_one(TallyPanel).tally == app.session.tally(len("the ferry ")) == screen.tally
        assert screen.query_one(ModelFacts).model is tiny_model
        # Setting the screen's attribute is all it takes to redraw the panel.
        screen.tally = Tally(1234, 617, 9, None)
        await pilot.pause()
        drawn = str(screen.query_one(TallyPanel).render())
        assert "1,234" in drawn and "617" in drawn and "50.0%" in drawn
