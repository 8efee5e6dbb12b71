"""``foretype study report``: read copy-task session logs back into measures, a chart and simulated savings."""

from __future__ import annotations

import argparse
from typing import Any

from ..errors import OptionError
from ..outputs import check_output, write_text_output
from .output import SVG_CHART, add_force_option, add_json_option, add_model_option, model_name, open_model, print_demo_note, print_json, progress_bar


def register(commands: argparse._SubParsersAction) -> None:
    """Add the study commands to the parser."""
    study = commands.add_parser(
        "study",
        help="copy-task studies run on the browser keyboard: read session logs back into measures",
        description="Copy-task text-entry studies. The browser keyboard of 'foretype serve' writes one session log "
        "per participant session; 'foretype study report' turns logs into per-phrase and session measures.",
    )
    actions = study.add_subparsers(dest="study_command", metavar="ACTION", parser_class=type(study))
    p = actions.add_parser(
        "report",
        help="entry rate, keystrokes per character, keystroke savings and error rates per phrase and session",
        description="Read session logs and report, per phrase and per session: entry rate in words per minute, "
        "keystrokes per character, keystroke savings, the minimum string distance error rate and the total, "
        "corrected and uncorrected error rates (Soukoreff & MacKenzie 2003). A phrase the log ends inside (page "
        "closed, server stopped) is reported as cut short. With --compare, the simulated typist of 'foretype "
        "savings' types the same phrases with the model. Example: foretype study report ~/.local/share/foretype/"
        "profiles/pilot/study/*.jsonl --compare --chart rates.svg",
    )
    p.add_argument("logs", nargs="+", metavar="LOG", help="session log files (JSON lines)")
    p.add_argument("--chart", metavar="FILE", help="write an SVG chart of the entry rate per phrase (and savings, with --compare)")
    add_force_option(p, "the --chart file")
    p.add_argument(
        "--compare",
        action=argparse.BooleanOptionalAction,
        default=False,
        help="type the same phrases with the simulated typist of 'foretype savings' (same k) and show its savings beside the measured",
    )
    add_model_option(p, "the model for --compare")
    p.add_argument("-k", type=int, default=None, help="suggestions per list for --compare (default: the session's own)")
    add_json_option(p)
    p.set_defaults(handler=run_study_report)
    study.set_defaults(handler=lambda args: _no_action(study))


def _no_action(parser: argparse.ArgumentParser) -> int:
    parser.print_help()
    return 0


def run_study_report(args: argparse.Namespace) -> int:
    """foretype study report."""
    from ..study import compare_with_simulation, entry_rate_chart, session_report

    if args.model and not args.compare:
        raise OptionError("-m/--model is only used with --compare")
    if args.k is not None and not 1 <= args.k <= 9:
        raise OptionError(f"-k must be 1 to 9, not {args.k}")
    if args.chart:
        check_output(args.chart, inputs=args.logs, kind=SVG_CHART, kind_name="SVG chart", force=args.force, option="--chart")
    reports = [session_report(path) for path in args.logs]
    if args.compare:
        model = open_model(args.model, quiet=args.json)
        with progress_bar("typing the phrases with the simulated typist") as update:
            for done, report in enumerate(reports, start=1):
                compare_with_simulation(report, model, args.k)
                update(done, len(reports))
    if args.chart:
        write_text_output(args.chart, entry_rate_chart(reports))
    _print_reports(args, reports)
    return 0


def _print_reports(args: argparse.Namespace, reports: list[Any]) -> None:
    from ..study import format_reports, reports_json

    if args.json:
        payload = reports_json(reports)
        payload["chart"] = args.chart
        if args.compare:
            payload["model"] = model_name(args.model)
        print_json(payload)
        return
    if args.compare:
        print_demo_note(args.model)
    print(format_reports(reports))
    if args.chart:
        print(f"chart: {args.chart}")
    print("Session logs are personal data: they stay on this machine unless you move them.")
