"""Plans: pick or create one; its corners and demands; ranked bins per role with the
reasons for every verdict; overrides; the pick list with its bring-up sheet; export,
save as a draft and reserve."""

from __future__ import annotations

from typing import Any, ClassVar

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, ScrollableContainer, Vertical, VerticalScroll
from textual.message import Message
from textual.widgets import DataTable, Footer, Input, Label, Static, TabbedContent, TabPane
from textual.worker import get_current_worker

from kitbin.tui.markup import cells
from kitbin.tui.markup import plain as _escape
from kitbin.tui.messages import InventoryChanged
from kitbin.tui.screens.base import KitbinModal, KitbinScreen
from kitbin.tui.screens.form import FormModal
from kitbin.tui.widgets.plan.text import (
    CORNER_COLUMNS,
    check_lines,
    corner_cells,
    demand_lines,
    divider_lines,
    plan_summary,
    ranked_cells,
)

PLAN_TABS = ("plans", "demands", "ranked", "pick", "stored")
#: Actions that need a worked-out plan.
_PLAN_ACTIONS = {"use_bin", "clear_use", "role", "boards", "export", "reserve", "save_draft"}
#: The widget of each tab that takes the focus when the tab is shown.
PANE_FOCUS = {
    "plans": "#plan-list",
    "demands": "#plan-corners",
    "ranked": "#plan-ranked",
    "pick": ".scroll-wide",
    "stored": "#plan-picks",
}
FORMATS = ("text", "csv", "md", "html")
EXTENSIONS = {"text": "txt", "csv": "csv", "md": "md", "html": "html"}


class PlansListed(Message):
    """The saved plans were read."""

    def __init__(self, plans: list[dict[str, Any]]) -> None:
        super().__init__()
        self.plans = plans


class PlanEvaluated(Message):
    """A plan's corners, demands, ranked bins and pick list were worked out."""

    def __init__(self, page: dict[str, Any]) -> None:
        super().__init__()
        self.page = page


class PlanCreated(Message):
    """A new plan was stored."""

    def __init__(self, plan: dict[str, Any]) -> None:
        super().__init__()
        self.plan = plan


class PickListExported(Message):
    """The pick list was written to a file."""

    def __init__(self, path: str, fmt: str) -> None:
        super().__init__()
        self.path = path
        self.fmt = fmt


class PickListReserved(Message):
    """The pick list was stored as reserved and its stock held."""

    def __init__(self, sheet: Any) -> None:
        super().__init__()
        self.sheet = sheet


class PickListSaved(Message):
    """The pick list was stored as a draft (no stock held)."""

    def __init__(self, sheet: Any) -> None:
        super().__init__()
        self.sheet = sheet


class PicksListed(Message):
    """The stored pick lists were read."""

    def __init__(self, picks: list[dict[str, Any]]) -> None:
        super().__init__()
        self.picks = picks


class PickListSettled(Message):
    """A stored pick list was reserved (a draft), taken from stock or released."""

    def __init__(self, result: dict[str, Any]) -> None:
        super().__init__()
        self.result = result


class PlanScreen(KitbinScreen):
    """Saved plans and what the shelf can do for them."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "back", "back"),
        Binding("n", "new_plan", "new"),
        Binding("u", "use_bin", "use bin"),
        Binding("x", "clear_use", "clear overrides", show=False),
        Binding("left_square_bracket", "role(-1)", "role ←", key_display="["),
        Binding("right_square_bracket", "role(1)", "role →", key_display="]"),
        Binding("plus", "boards(1)", "boards+", key_display="+", show=False),
        Binding("minus", "boards(-1)", "boards−", key_display="-", show=False),
        Binding("e", "export", "export"),
        Binding("S", "save_draft", "save draft", key_display="S"),
        Binding("R", "reserve", "reserve", key_display="R"),
        Binding("1", "tab('plans')", "plans", show=False),
        Binding("2", "tab('demands')", "demands", show=False),
        Binding("3", "tab('ranked')", "ranked", show=False),
        Binding("4", "tab('pick')", "pick list", show=False),
        Binding("5", "tab('stored')", "stored pick lists", show=False),
        Binding("T", "settle('take')", "take parts", key_display="T"),
        Binding("C", "settle('cancel')", "release", key_display="C"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.plans: list[dict[str, Any]] = []
        self.plan_name: str | None = None
        self.page: dict[str, Any] | None = None
        self.boards = 1
        self.use: dict[str, str] = {}
        self.role_index = 0

    def compose(self) -> ComposeResult:
        yield Static(
            "kitbin · plans  (keys 1-5 switch tabs, + and - change boards)", classes="title"
        )
        yield Static("reading plans…", id="plan-status", classes="status")
        with TabbedContent(id="plan-tabs"):
            with TabPane("1 plans", id="plans"):
                yield DataTable(id="plan-list", cursor_type="row")
            with TabPane("2 demands", id="demands"):
                yield DataTable(id="plan-corners", cursor_type="row")
                with VerticalScroll(classes="scroll-text"):
                    yield Static("", id="plan-demands")
            with TabPane("3 ranked", id="ranked"):
                yield Static("", id="plan-role", classes="status")
                yield DataTable(id="plan-ranked", cursor_type="row")
                with VerticalScroll(classes="scroll-text"):
                    yield Static("", id="plan-reasons")
            with TabPane("4 pick list", id="pick"), ScrollableContainer(classes="scroll-wide"):
                yield Static("", id="plan-sheet", classes="wide-text")
            with TabPane("5 stored", id="stored"):
                yield DataTable(id="plan-picks", cursor_type="row")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#plan-list", DataTable).add_columns("plan", "what")
        self.query_one("#plan-corners", DataTable).add_columns(*(h for _, h in CORNER_COLUMNS))
        self.query_one("#plan-ranked", DataTable).add_columns(
            "rank", "bin", "verdict", "score", "why"
        )
        self.query_one("#plan-picks", DataTable).add_columns(
            "id", "plan", "boards", "state", "created (UTC)", "lines"
        )
        self.list_plans(self.app.store)
        self.list_picks(self.app.store)
        self.query_one("#plan-list", DataTable).focus()

    # -- workers ---------------------------------------------------------------------

    @work(thread=True, exclusive=True, exit_on_error=False, group="plans")
    def list_plans(self, store: Any) -> None:
        """Read the saved plans (in a thread)."""
        from kitbin.services import plans

        self.post_message(PlansListed(plans.list_plans(store)))

    @work(thread=True, exclusive=True, exit_on_error=False, group="picks")
    def list_picks(self, store: Any) -> None:
        """Read the stored pick lists (in a thread)."""
        from kitbin.services import picking

        self.post_message(PicksListed(picking.list_picks(store)))

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan-write")
    def settle(self, store: Any, pick_id: int, how: str) -> None:
        """Reserve a draft pick list, take a reserved one's parts, or cancel either
        (in a thread)."""
        from kitbin.services import picking

        act = {"take": picking.take, "cancel": picking.cancel, "reserve": picking.reserve_draft}
        self.post_message(PickListSettled(act[how](store, pick_id)))

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan")
    def evaluate(self, store: Any, name: str, boards: int, use: dict[str, str]) -> None:
        """Corners, demands, ranked bins and the pick list of a plan (in a thread)."""
        from kitbin.services import ui_support

        page = ui_support.plan_page(store, name, boards=boards, use=use)
        if not get_current_worker().is_cancelled:  # a newer evaluation has started
            self.post_message(PlanEvaluated(page))

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan-write")
    def export(self, sheet: Any, fmt: str, path: str) -> None:
        """Write the pick list to a file (in a thread)."""
        from kitbin.services import picking

        self.post_message(PickListExported(str(picking.write_sheet(sheet, fmt, path)), fmt))

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan-write")
    def reserve(self, store: Any, name: str, boards: int, use: dict[str, str]) -> None:
        """Store the pick list as reserved and hold its stock (in a thread)."""
        from kitbin.services import picking

        sheet = picking.reserve(store, name, boards=boards, use=use)
        self.post_message(PickListReserved(sheet))

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan-write")
    def save_draft(self, store: Any, name: str, boards: int, use: dict[str, str]) -> None:
        """Store the pick list as a draft, holding no stock (in a thread)."""
        from kitbin.services import picking

        self.post_message(PickListSaved(picking.save_draft(store, name, boards=boards, use=use)))

    # -- showing ---------------------------------------------------------------------

    @on(PlansListed)
    def _listed(self, message: PlansListed) -> None:
        self.plans = message.plans
        table = self.query_one("#plan-list", DataTable)
        table.clear()
        for p in self.plans:
            table.add_row(*cells([p["name"], p.get("summary", "")]), key=p["name"])
        status = f"{len(self.plans)} plans · enter evaluates one · n creates one"
        if not self.plans:
            status = "no plans yet: press n to create one"
        self.query_one("#plan-status", Static).update(status)

    @on(PicksListed)
    def _picks_listed(self, message: PicksListed) -> None:
        from kitbin.tui.widgets.plan.text import pick_cells

        table = self.query_one("#plan-picks", DataTable)
        table.clear()
        for p in message.picks:
            table.add_row(*cells(pick_cells(p)), key=str(p["id"]))

    def action_settle(self, how: str) -> None:
        tabs = self.query_one(TabbedContent)
        table = self.query_one("#plan-picks", DataTable)
        if tabs.active != "stored" or not table.row_count:
            self.notify("choose a stored pick list on tab 5 first", severity="warning")
            return
        key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        self.settle(self.app.store, int(key), how)

    @on(PickListSettled)
    def _settled(self, message: PickListSettled) -> None:
        r = message.result
        self.notify(f"pick list {r['id']} {r['state']}")
        self.list_picks(self.app.store)
        self.app.post_message(InventoryChanged(None))
        if self.plan_name is not None:
            self._evaluate()

    @on(DataTable.RowSelected, "#plan-list")
    def _plan_chosen(self, event: DataTable.RowSelected) -> None:
        self.choose(str(event.row_key.value))

    def choose(self, name: str) -> None:
        """Evaluate plan ``name`` with no overrides."""
        if name != self.plan_name:
            self.use = {}
            self.role_index = 0
        self.plan_name = name
        self._evaluate()

    def _evaluate(self) -> None:
        if self.plan_name is None:
            return
        self.query_one("#plan-status", Static).update(f"working out {self.plan_name}…")
        self.evaluate(self.app.store, self.plan_name, self.boards, dict(self.use))

    @on(PlanEvaluated)
    def _evaluated(self, message: PlanEvaluated) -> None:
        page = self.page = message.page
        self.refresh_bindings()
        plan = page["plan"]
        overrides = ", ".join(f"{r}={b}" for r, b in page["use"].items()) or "none"
        self.query_one("#plan-status", Static).update(
            _escape(f"{plan_summary(plan)} · {page['boards']} board(s) · overrides: {overrides}")
        )
        corners = self.query_one("#plan-corners", DataTable)
        corners.clear()
        for c in plan.get("corners", ()):
            corners.add_row(*cells(corner_cells(c)))
        self.query_one("#plan-demands", Static).update(
            _escape("\n".join(demand_lines(plan.get("demands", {}))))
        )
        self._show_role()
        self._show_sheet(page["sheet"])
        if self.query_one(TabbedContent).active == "plans":
            self.action_tab("ranked")

    def _show_sheet(self, sheet: Any) -> None:
        from kitbin.picking import render

        self.query_one("#plan-sheet", Static).update(_escape(render(sheet, "text")))

    def _roles(self) -> list[str]:
        if self.page is None:
            return []
        roles = list(self.page["match"].roles)
        if self.page["match"].divider is not None:
            roles.append("feedback_divider")
        return roles

    def _show_role(self) -> None:
        roles = self._roles()
        table = self.query_one("#plan-ranked", DataTable)
        table.clear()
        reasons = self.query_one("#plan-reasons", Static)
        if not roles:
            self.query_one("#plan-role", Static).update("no roles")
            reasons.update("")
            return
        self.role_index %= len(roles)
        role = roles[self.role_index]
        chosen = self.use.get(role)
        head = (
            f"role {self.role_index + 1}/{len(roles)}: {role}  ([ and ] switch roles, u uses a bin)"
        )
        if chosen:
            head += f" · override: {chosen}"
        self.query_one("#plan-role", Static).update(_escape(head))
        m = self.page["match"]
        if role == "feedback_divider":
            from kitbin.services.matching import divider_dict

            reasons.update(_escape("\n".join(divider_lines(divider_dict(m.divider)))))
            return
        rm = m.roles[role]
        for row in rm.rows:
            table.add_row(*cells(ranked_cells(row)), key=row.label)
        counts = ", ".join(f"{k} {v}" for k, v in rm.counts.items())
        lines = [f"candidates: {counts}"] + [f"note: {n}" for n in rm.notes]
        if rm.rows:
            lines += ["", *self._reason_lines(rm.rows[0])]
        else:
            lines.append("no stocked bin of this kind")
        reasons.update(_escape("\n".join(lines)))

    def _reason_lines(self, row: Any) -> list[str]:
        return [f"{row.label}: {row.verdict} — {row.summary}", *check_lines(row.checks)] + [
            f"note: {n}" for n in row.notes
        ]

    @on(DataTable.RowHighlighted, "#plan-ranked")
    def _ranked_highlighted(self, event: DataTable.RowHighlighted) -> None:
        row = self._row(event.row_key.value if event.row_key else None)
        if row is not None:
            self.query_one("#plan-reasons", Static).update(
                _escape("\n".join(self._reason_lines(row)))
            )

    def _row(self, label: str | None) -> Any:
        roles = self._roles()
        if self.page is None or label is None or not roles:
            return None
        rm = self.page["match"].roles.get(roles[self.role_index])
        if rm is None:
            return None
        return next((r for r in rm.rows if r.label == label), None)

    # -- keys ------------------------------------------------------------------------

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        # keys that act on a worked-out plan stay out of the footer until there is one;
        # taking and releasing apply to the stored pick lists' tab only
        active = self.query_one(TabbedContent).active if self.is_mounted else ""
        if action == "settle":
            return active == "stored"
        if action == "reserve" and active == "stored":
            return True  # R on tab 5 reserves the highlighted draft
        if action in _PLAN_ACTIONS:
            return self.page is not None and active != "stored"
        return True

    @on(TabbedContent.TabActivated)
    def _tab_shown(self) -> None:
        self.refresh_bindings()

    def _need_plan(self) -> bool:
        if self.page is None:
            self.notify("choose a plan first (enter on the plans tab)", severity="warning")
            return False
        return True

    def action_tab(self, tab: str) -> None:
        # Focus moves into the new pane at once: a TabbedContent switches back to the
        # pane that still holds the focus (seen with Textual 8.2.8).
        self.query_one(TabbedContent).active = tab
        self.query_one(f"#{tab} {PANE_FOCUS[tab]}").focus()

    def action_role(self, step: int) -> None:
        if not self._need_plan():
            return
        self.role_index += step
        self._show_role()
        if self.query_one(TabbedContent).active != "ranked":
            self.action_tab("ranked")

    def action_use_bin(self) -> None:
        if not self._need_plan():
            return
        roles = self._roles()
        role = roles[self.role_index % len(roles)] if roles else None
        table = self.query_one("#plan-ranked", DataTable)
        if role is None or role == "feedback_divider" or not table.row_count:
            self.notify("highlight a bin on the ranked tab first", severity="warning")
            return
        label = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        self.use[role] = str(label)
        self.notify(f"{role}: using {label}")
        self._evaluate()

    def action_clear_use(self) -> None:
        if self._need_plan():
            self.use = {}
            self._evaluate()

    def action_boards(self, step: int) -> None:
        if not self._need_plan():
            return
        self.boards = max(1, self.boards + step)
        self._evaluate()

    def action_export(self) -> None:
        if not self._need_plan():
            return

        def done(answer: tuple[str, str] | None) -> None:
            if answer is not None:
                self.export(self.page["sheet"], *answer)

        self.app.push_screen(ExportScreen(self.plan_name or "pick"), done)

    @on(PickListExported)
    def _exported(self, message: PickListExported) -> None:
        self.notify(f"pick list written ({message.fmt}): {message.path}")

    def action_reserve(self) -> None:
        if self.query_one(TabbedContent).active == "stored":
            self.action_settle("reserve")
        elif self._need_plan():
            self.reserve(self.app.store, self.plan_name, self.boards, dict(self.use))

    def action_save_draft(self) -> None:
        if self._need_plan():
            self.save_draft(self.app.store, self.plan_name, self.boards, dict(self.use))

    @on(PickListSaved)
    def _saved(self, message: PickListSaved) -> None:
        sheet = message.sheet
        self.page["sheet"] = sheet
        self._show_sheet(sheet)
        self.action_tab("pick")
        self.notify(
            f"pick list {sheet.pick_id} saved as a draft, no stock held; reserve it with R "
            f"on tab 5 or `kitbin picks reserve {sheet.pick_id}`"
        )
        self.list_picks(self.app.store)

    @on(PickListReserved)
    def _reserved(self, message: PickListReserved) -> None:
        sheet = message.sheet
        self.page["sheet"] = sheet
        self._show_sheet(sheet)
        self.action_tab("pick")
        self.notify(
            f"pick list {sheet.pick_id} reserved; take the parts with "
            f"`kitbin picks done {sheet.pick_id}` or release them with "
            f"`kitbin picks cancel {sheet.pick_id}`"
        )
        self.app.post_message(InventoryChanged(None))
        self.list_picks(self.app.store)

    def action_new_plan(self) -> None:
        def done(plan: dict[str, Any] | None) -> None:
            if plan is not None:
                self.list_plans(self.app.store)
                self.choose(plan["name"])

        self.app.push_screen(NewPlanScreen(), done)

    def action_back(self) -> None:
        self.app.pop_screen()


#: Fields of the new-plan form: (option of `kitbin plan new`, label, hint).
PLAN_FIELDS: tuple[tuple[str, str, str], ...] = (
    ("name", "name", "e.g. bench-5v"),
    ("--topology", "topology", "buck, boost or invert"),
    ("--vin", "input", "range, e.g. 11..15V"),
    ("--vout", "output", "e.g. 5V"),
    ("--iout", "full load", "e.g. 1.5A"),
    ("--fsw", "switching", "e.g. 500kHz"),
    ("controller", "controller", "controller bin label (optional; fills vref, fsw …)"),
    ("--vref", "vref", "reference voltage, if no controller bin (e.g. 0.8V)"),
)


class NewPlanScreen(FormModal):
    """A new plan: the few numbers a converter needs (the rest take their defaults)."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+s", "save", "save plan", priority=True)]
    FIELDS = PLAN_FIELDS
    PREFIX = "plan-field"
    REFUSED = "nothing saved"

    def form_title(self) -> str:
        return "New plan (other settings: `kitbin plan edit`)"

    def action_save(self) -> None:
        values = {k: v.strip() for k, v in self.values().items()}
        if not values["name"]:
            self.refuse("give the plan a name")
            return
        self.create(self.app.store, values)

    @work(thread=True, exclusive=True, exit_on_error=False, group="plan-new")
    def create(self, store: Any, values: dict[str, str]) -> None:
        """Parse the fields and store the plan (in a thread; nothing written on error)."""
        from kitbin.services import plans

        texts = {k: (v or None) for k, v in values.items() if k.startswith("--")}
        updates = plans.parse_spec_texts(texts)
        plan = plans.new_plan(
            store, values["name"], updates, controller=values["controller"] or None
        )
        self.post_message(PlanCreated(plan))

    @on(PlanCreated)
    def _created(self, message: PlanCreated) -> None:
        self.notify(f"saved plan {message.plan['name']} ({message.plan['topology']})")
        self.dismiss(message.plan)


class ExportScreen(KitbinModal):
    """Where and how to write the pick list (the formats of `kitbin pick`)."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+s", "save", "write", priority=True),
        Binding("escape", "cancel", "cancel"),
    ]

    def __init__(self, stem: str) -> None:
        super().__init__()
        self.stem = "".join(ch if ch.isalnum() or ch in "-_" else "-" for ch in stem)

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static("Export the pick list", classes="dialog-title")
            with Horizontal(classes="field-row"):
                yield Label("format")
                yield Input(
                    value="md",
                    placeholder="text, csv, md or html",
                    id="export-format",
                    classes="field-input",
                )
            with Horizontal(classes="field-row"):
                yield Label("file")
                yield Input(value=f"{self.stem}-pick.md", id="export-path", classes="field-input")
            yield Static("", id="export-problems", classes="check-bad")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.query_one("#export-format", Input).focus()

    @on(Input.Changed, "#export-format")
    def _format_changed(self, event: Input.Changed) -> None:
        fmt = event.value.strip().lower()
        path = self.query_one("#export-path", Input)
        if fmt in FORMATS and path.value.startswith(f"{self.stem}-pick."):
            path.value = f"{self.stem}-pick.{EXTENSIONS[fmt]}"

    @on(Input.Submitted, "#export-format")
    def _to_path(self) -> None:
        self.query_one("#export-path", Input).focus()

    @on(Input.Submitted, "#export-path")
    def _submit(self) -> None:
        self.action_save()

    def action_save(self) -> None:
        fmt = self.query_one("#export-format", Input).value.strip().lower()
        path = self.query_one("#export-path", Input).value.strip()
        if fmt not in FORMATS:
            text = f"format '{fmt}': expected one of {', '.join(FORMATS)}"
        elif not path:
            text = "give a file name"
        else:
            self.dismiss((fmt, path))
            return
        self.query_one("#export-problems", Static).update(_escape(text))
        self.notify(text, severity="error")

    def action_cancel(self) -> None:
        self.dismiss(None)
