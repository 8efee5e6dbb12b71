"""``foretype study report``: read copy-task session logs back into measures, a chart and simulated savings."""

from __future__ import annotations

import argparse
from typing import BinaryIO

from ..errors import OptionError
from .output import add_json_option, open_model, print_json, progress_bar


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
    p.add_argument(
        "--compare",
        action="store_true",
        help="type the same phrases with the simulated typist of 'foretype savings' (same k) and show its savings beside the measured",
    )
    p.add_argument("--model", metavar="MODEL", help="the model for --compare (default: the demo model)")
    p.add_argument("-k", type=int, default=None, help="suggestions per list for --compare (default: the session's own)")
    add_json_option(p)
    p.set_defaults(handler=run_study_report)
    study.set_defaults(handler=lambda args: _no_action(study))


def _no_action(parser: argparse.ArgumentParser) -> int:
    parser.print_help()
    return 0


def run_study_report(args: argparse.Namespace) -> int:
    """foretype study report."""
    from ..simulate.writing import check_writable_file
    from ..study import compare_with_simulation, entry_rate_chart, format_reports, reports_json, session_report

    if args.model and not args.compare:
        raise OptionError("--model is only used with --compare")
    if args.k is not None and not 1 <= args.k <= 9:
        raise OptionError(f"-k must be 1 to 9, not {args.k}")
    if args.chart:
        check_writable_file(args.chart)
    reports = [session_report(path) for path in args.logs]
    if args.compare:
        model = open_model(args.model, quiet=args.json)
        with progress_bar("typing the phrases with the simulated typist") as update:
            for done, report in enumerate(reports, start=1):
                compare_with_simulation(report, model, args.k)
                update(done, len(reports))
    if args.chart:
        _write_chart(args.chart, entry_rate_chart(reports))
    if args.json:
        payload = reports_json(reports)
        payload["chart"] = args.chart
        print_json(payload)
    else:
        print(format_reports(reports))
        if args.chart:
            print(f"chart: {args.chart}")
        print("Session logs are personal data: they stay on this machine unless you move them.")
    return 0


def _write_chart(path: str, svg: str) -> None:
    from ..errors import OutputError
    from ..modelfile.atomic import replace_atomically

    def write(handle: BinaryIO) -> None:
        handle.write(svg.encode("utf-8"))

    try:
        replace_atomically(path, write)
    except OSError as error:
        raise OutputError(f"{path}: cannot write the chart ({error.strerror or error})") from None
