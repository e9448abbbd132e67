"""The ``roomcalc`` command line. Imports the terminal interface only inside the function that
starts it, so ``roomcalc report`` never loads Textual."""

from __future__ import annotations

import argparse
import gc
import sys
from pathlib import Path

from roomcalc import __version__

EXIT_OK, EXIT_INPUT = 0, 2
#: The exit code after Ctrl+C (128 + SIGINT), as shells report it.
EXIT_INTERRUPTED = 130
#: A plan taking longer than this shows its progress on stderr (a terminal only) [s].
PROGRESS_AFTER_S = 1.0


def _parser() -> argparse.ArgumentParser:
    common = argparse.ArgumentParser(add_help=False)
    common.add_argument("--catalog", action="append", default=[], metavar="PATH",
                        help="an extra material catalogue file or folder (may be repeated)")
    fmt = argparse.ArgumentParser(add_help=False)
    fmt.add_argument("--format", choices=("text", "markdown", "json", "csv"), default="text",
                     help="output format (json and csv are always in SI units)")

    p = argparse.ArgumentParser(
        prog="roomcalc",
        description="Estimate what a room does to sound, per octave band, and what treatment "
                    "changes: reverberation time, room constant, levels, critical distance. "
                    "With no command, the interface opens on the built-in demo room.")
    p.add_argument("--version", action="version", version=f"roomcalc {__version__}")
    p.add_argument("--catalog", action="append", default=[], metavar="PATH",
                   help="an extra material catalogue file or folder (may be repeated)")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    r = sub.add_parser("report", parents=[common, fmt], help="the full per-band report of a room")
    r.add_argument("file", nargs="?", help="room file (.toml)")
    r.add_argument("--demo", action="store_true", help="use the built-in demo room")
    r.add_argument("--method", choices=("sabine", "eyring", "millington", "fitzroy",
                                        "arau_puchades"),
                   help="reverberation formula to base the summary on (default: the one "
                        "recommended for the room)")
    r.add_argument("--reverberant", choices=("classic", "barron-lee"), default="classic",
                   help="model of the reverberant level: diffuse field 4/R (classic) or "
                        "Barron & Lee's revised theory")

    c = sub.add_parser("check", parents=[common], help="check a room file and say what is wrong")
    c.add_argument("--format", choices=("text", "json"), default="text",
                   help="output format (json: problems, or the formula in force, warnings and "
                        "the target check, in SI units)")
    c.add_argument("file", nargs="?", help="room file (.toml)")
    c.add_argument("--demo", action="store_true", help="check the built-in demo room")

    k = sub.add_parser("compare", parents=[common, fmt],
                       help="before and after: two rooms, e.g. a room and its treated copy")
    k.add_argument("before", nargs="?", help="room file before treatment")
    k.add_argument("after", nargs="?", help="room file after treatment")
    k.add_argument("--demo", action="store_true",
                   help="compare the demo room with its treated copy")

    o = sub.add_parser("open", parents=[common], help="open a room file in the interface")
    o.add_argument("file", help="room file (.toml); if it does not exist, you are offered a "
                                "new room of a box size to save there")
    n = sub.add_parser("new", parents=[common], help="start a new room in the interface from "
                                                     "a box size")
    n.add_argument("file", nargs="?", help="where to save it (asked on saving if not given)")

    pl = sub.add_parser("plan", parents=[common],
                        help="the cheapest treatment that brings a room to its [target]")
    pl.add_argument("file", help="room file (.toml) with [target] and [[candidates]]")
    pl.add_argument("--objective", choices=("cost", "area"),
                    help="least cost (default, or the file's [target] objective) or least area")
    pl.add_argument("--format", choices=("text", "markdown", "json", "csv"), default="text",
                    help="output format (json and csv are in SI units)")
    pl.add_argument("--write", metavar="TREATED.toml",
                    help="also write the treated room as a new room file")

    m = sub.add_parser("materials", parents=[common, fmt], help="search the material catalogue")
    m.add_argument("words", nargs="*", help="words that must all appear (id, name, notes)")
    m.add_argument("--category", help="only this category (part of its name is enough)")
    m.add_argument("--kind", choices=("surface", "object"), help="only this kind")
    sub.add_parser("sources", parents=[fmt],
                   help="list the typical sound sources: their dB(A) at 1 m, octave levels "
                        "and where the numbers come from")
    return p


def main(argv=None) -> int:
    parser = _parser()
    args = parser.parse_args(argv)
    interface = args.command in (None, "open", "new")
    if interface:
        # Start-up of the interface makes about 100,000 objects that live as long as it does;
        # the collector's passes over them cost a tenth of a second before the first screen.
        # It is switched on again once the screen is up (RoomApp._settle) or when it ends.
        gc.disable()
    try:
        return _main(args)
    finally:
        if interface:
            gc.enable()


def _main(args) -> int:
    from roomcalc.io.errors import RoomFileError

    try:
        return _run(args)
    except RoomFileError as exc:
        for problem in exc.problems:
            print(problem, file=sys.stderr)
        n = len(exc.problems)
        print(f"roomcalc: {n} problem{'s' if n != 1 else ''} found; nothing was computed.",
              file=sys.stderr)
        return EXIT_INPUT
    except ValueError as exc:
        print(f"roomcalc: {exc}", file=sys.stderr)
        return EXIT_INPUT
    except BrokenPipeError:
        return EXIT_OK
    except KeyboardInterrupt:
        print("\nroomcalc: stopped (Ctrl+C).", file=sys.stderr)
        return EXIT_INTERRUPTED


def _run(args) -> int:
    from roomcalc.io.catalog import load_catalog

    if args.command == "sources":
        from roomcalc.io.sources import typical_sources
        from roomcalc.present.sources import sources_text

        sys.stdout.write(sources_text(list(typical_sources().values()), args.format))
        return EXIT_OK

    catalog = load_catalog(getattr(args, "catalog", []))

    if args.command in (None, "open", "new"):
        return _interface(args, catalog)

    if args.command == "materials":
        from roomcalc.present.materials import materials_text, no_match_text

        words = " ".join(args.words)
        mats = catalog.search(words, args.category, args.kind)
        if mats or args.format in ("json", "csv"):
            sys.stdout.write(materials_text(mats, args.format))
        if not mats:        # said on stdout as the listing, beside the data in JSON and CSV
            from roomcalc.present.numbers import wrap

            print(wrap(no_match_text(words, catalog.suggest_categories(words), args.category)
                       + " (roomcalc materials --category NAME)", "", "  "),
                  file=sys.stderr if args.format in ("json", "csv") else sys.stdout)
        return EXIT_OK

    if args.command == "plan":
        return _plan(args, catalog)

    if args.command in ("report", "check"):
        return _report(args, catalog)

    if args.command == "compare":
        return _compare(args, catalog)
    return EXIT_INPUT  # pragma: no cover - argparse rejects unknown commands


def _room_path(args):
    """The room file a report or check is about (the demo with --demo); None: none given."""
    from roomcalc.io import paths

    if args.demo:
        return paths.demo_room_path()
    if args.file is None:
        print(f"roomcalc {args.command}: give a room file or --demo", file=sys.stderr)
    return args.file


def _report(args, catalog) -> int:
    from roomcalc.present import report
    from roomcalc.study import Study

    path = _room_path(args)
    if path is None:
        return EXIT_INPUT
    shown = "built-in demo room" if args.demo else str(path)
    if args.command == "check":
        if args.format == "json":
            return _check_json(path, shown, catalog)
        study = Study.from_file(path, catalog)
        sys.stdout.write(report.check_text(study.answer(), shown))
        return EXIT_OK
    study = Study.from_file(path, catalog, method=args.method,
                            reverberant_model=args.reverberant)
    sys.stdout.write(report.report(study.answer(), args.format, shown, study.spec.unit_system))
    return EXIT_OK


def _check_json(path, shown: str, catalog) -> int:
    """``check --format json``: the answer's summary, or every problem (exit 2), on stdout."""
    from roomcalc.io.errors import RoomFileError
    from roomcalc.present import report
    from roomcalc.present.numbers import json_text
    from roomcalc.study import Study

    try:
        data = report.check_dict(Study.from_file(path, catalog).answer(), shown)
        code = EXIT_OK
    except RoomFileError as exc:
        data = report.problems_dict(exc.problems, shown)
        code = EXIT_INPUT
    sys.stdout.write(json_text(data))
    return code


def _compare(args, catalog) -> int:
    from roomcalc.io import paths
    from roomcalc.present.compare import compare_report
    from roomcalc.study import Study

    if args.demo:
        before, after = paths.demo_room_path(), paths.demo_treated_path()
    elif args.before is None or args.after is None:
        print("roomcalc compare: give two room files (BEFORE AFTER) or --demo",
              file=sys.stderr)
        return EXIT_INPUT
    else:
        before, after = args.before, args.after
    rb = Study.from_file(before, catalog).evaluate()
    # The room after is evaluated by the formula in force before, like for like.
    ra = Study.from_file(after, catalog, method=rb.method).evaluate()
    names = (Path(before).name, Path(after).name)
    sys.stdout.write(compare_report(Study.compare(rb, ra), names, args.format))
    return EXIT_OK


def _plan(args, catalog) -> int:
    from roomcalc.present import sections
    from roomcalc.present.numbers import json_text
    from roomcalc.study import Study, exposures

    study = Study.from_file(args.file, catalog)
    if study.spec.target is None:
        print(f"roomcalc plan: {args.file} has no [target] table: say what the room must "
              "reach (criterion = \"<id>\", or rt60_max = [...], or max_level_dba = {...})",
              file=sys.stderr)
        return EXIT_INPUT
    progress = _StderrProgress() if sys.stderr.isatty() else None
    try:
        run = study.plan(objective=args.objective, progress=progress)
    except KeyboardInterrupt:
        if progress is not None:
            progress.clear()
        print("roomcalc plan: stopped (Ctrl+C); no plan was made and nothing was written.",
              file=sys.stderr)
        return EXIT_INTERRUPTED
    if progress is not None:
        progress.clear()
    if args.write:
        study.write_treated(run, args.write)
    u = study.spec.unit_system
    if args.format == "json":
        data = sections.plan_dict(run, u)
        if args.write:
            data["written"] = str(args.write)
        sys.stdout.write(json_text(data))
    elif args.format == "csv":
        sys.stdout.write(sections.plan_csv(run, u))
    else:
        sys.stdout.write(sections.plan_markdown(run, u) if args.format == "markdown"
                         else sections.plan_text(run, u))
        days = exposures(study.spec, run.described_before)
        if days:
            after = exposures(study.spec, run.described_after)
            text = sections.exposure_text(days, after)
            sys.stdout.write(f"\n## Daily noise exposure\n\n```\n{text}```\n"
                             if args.format == "markdown" else text)
        if args.write:
            print(f"Treated room written to {args.write}")
    return EXIT_OK if run.plan.feasible else 1


class _StderrProgress:
    """The plan's progress on one line of stderr, once the plan has taken more than
    PROGRESS_AFTER_S (a quick plan prints nothing)."""

    def __init__(self) -> None:
        self.shown = False

    def __call__(self, p) -> None:
        if p.elapsed_s < PROGRESS_AFTER_S:
            return
        line = f"planning: {p.text}  {p.elapsed_s:.1f} s  (Ctrl+C stops)"
        sys.stderr.write("\r\033[K" + line[:200])
        sys.stderr.flush()
        self.shown = True

    def clear(self) -> None:
        if self.shown:
            sys.stderr.write("\r\033[K")
            sys.stderr.flush()
            self.shown = False


def _interface(args, catalog) -> int:
    """Start the terminal interface (imported only here, so the other commands never load
    Textual)."""
    if not sys.stdin.isatty() or not sys.stdout.isatty():
        print("roomcalc: the interface needs a terminal; for a report use "
              "'roomcalc report FILE' (or --demo)", file=sys.stderr)
        return EXIT_INPUT
    from roomcalc.tui.app import AppConfig, make_app
    from roomcalc.tui.document import Document

    doc, ask_size = None, False
    if args.command == "open":
        path = Path(args.file)
        if path.exists():
            doc = Document.open(path)
        else:
            doc, ask_size = Document.new_box(6.0, 4.0, 2.7, path=path), True
    elif args.command == "new":
        doc, ask_size = Document.new_box(6.0, 4.0, 2.7,
                                         path=Path(args.file) if args.file else None), True
    app = make_app(doc, catalog, AppConfig(ask_box_size=ask_size))
    app.run()
    _end_with_a_plan_under_way(EXIT_OK)
    return EXIT_OK


#: How long a quitting interface waits for a plan it stopped to end by itself [s].
PLAN_STOP_WAIT_S = 0.3


def _end_with_a_plan_under_way(code: int) -> None:
    """The interface has closed (its screen restored, its files written) while a plan it
    stopped is still inside a solver call (the planner stops only between calls). Waiting could
    take as long as that call; letting the interpreter shut down around the solver's own threads
    aborts the process. So: a short wait, then the process ends at once with ``code``."""
    import os
    import threading

    from roomcalc.tui.screens.plan_routes import PLAN_THREAD_NAME

    planning = [t for t in threading.enumerate() if t.name == PLAN_THREAD_NAME and t.is_alive()]
    for t in planning:
        t.join(PLAN_STOP_WAIT_S)
    if any(t.is_alive() for t in planning):
        sys.stdout.flush()
        sys.stderr.flush()
        os._exit(code)


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
