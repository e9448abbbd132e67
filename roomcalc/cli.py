"""The ``roomcalc`` command line. Imports the terminal interface only inside the function that
starts it, so ``roomcalc report`` never loads Textual."""

from __future__ import annotations

import argparse
import gc
import sys
from pathlib import Path

from roomcalc import __version__

EXIT_OK, EXIT_INPUT = 0, 2


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
    pl.add_argument("--format", choices=("text", "json"), default="text",
                    help="output format (json is in SI units)")
    pl.add_argument("--write", metavar="TREATED.toml",
                    help="also write the treated room as a new room file")

    m = sub.add_parser("materials", parents=[common, fmt], help="search the material catalogue")
    m.add_argument("words", nargs="*", help="words that must all appear (id, name, notes)")
    m.add_argument("--category", help="only this category (part of its name is enough)")
    m.add_argument("--kind", choices=("surface", "object"), help="only this kind")
    return p


def _load(path, catalog):
    from roomcalc.io.roomfile import read_room

    return read_room(path, catalog)


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
        return 130


def _need_file(args, name: str):
    value = getattr(args, name)
    if value is None and not args.demo:
        print(f"roomcalc {args.command}: give a room file or --demo", file=sys.stderr)
        return None
    return value


def _run(args) -> int:
    from roomcalc.engine.analysis import compare, evaluate
    from roomcalc.io import paths, report
    from roomcalc.io.catalog import load_catalog

    catalog = load_catalog(getattr(args, "catalog", []))

    if args.command in (None, "open", "new"):
        return _interface(args, catalog)

    if args.command == "materials":
        mats = catalog.search(" ".join(args.words), args.category, args.kind)
        sys.stdout.write(report.materials_text(mats, args.format))
        return EXIT_OK

    if args.command == "plan":
        return _plan(args, catalog)

    if args.command in ("report", "check"):
        if args.demo:
            path = paths.demo_room_path()
        else:
            path = _need_file(args, "file")
            if path is None:
                return EXIT_INPUT
        spec, room = _load(path, catalog)
        shown = "built-in demo room" if args.demo else str(path)
        if args.command == "check":
            result = evaluate(room)
            counts = ", ".join(f"{n} {w if n == 1 else w + 's'}" for n, w in (
                (len(room.surfaces), "surface"), (len(room.objects), "object"),
                (len(room.sources), "source"), (len(room.receivers), "receiver")))
            print(f"{shown}: ok ({counts})")
            for w in result.warnings:
                print(report.wrap(w.message, "  warning: ", "    "))
            sys.stdout.write(_extras_text(spec, room, result, str(path)))
            return EXIT_OK
        result = evaluate(room, reverberant_model=args.reverberant, method=args.method)
        if args.format == "json":
            import json

            from roomcalc.io import targets

            data = report.result_dict(result)
            check = targets.target_check(spec, room, result, filename=str(path))
            if check is not None:
                data["target"] = targets.target_dict(check)
            days = targets.exposures(spec, result)
            if days:
                data["exposure"] = targets.exposure_dict(days)
            sys.stdout.write(json.dumps(data, indent=2) + "\n")
            return EXIT_OK
        sys.stdout.write(report.REPORTERS[args.format](result, shown, spec.unit_system))
        if args.format in ("text", "markdown"):
            extra = _extras_text(spec, room, result, str(path))
            if extra:
                sys.stdout.write(("\n```\n" + extra + "```\n") if args.format == "markdown"
                                 else "\n" + extra)
        return EXIT_OK

    if args.command == "compare":
        if args.demo:
            before, after = paths.demo_room_path(), paths.demo_treated_path()
        elif args.before is None or args.after is None:
            print("roomcalc compare: give two room files (BEFORE AFTER) or --demo",
                  file=sys.stderr)
            return EXIT_INPUT
        else:
            before, after = args.before, args.after
        rb = evaluate(_load(before, catalog)[1])
        ra = evaluate(_load(after, catalog)[1])
        names = (Path(before).name, Path(after).name)
        sys.stdout.write(report.compare_text(compare(rb, ra), names, args.format))
        return EXIT_OK
    return EXIT_INPUT  # pragma: no cover - argparse rejects unknown commands


def _extras_text(spec, room, result, filename: str) -> str:
    """The target check and the daily exposure, when the room file asks for them."""
    from roomcalc.io import targets

    out = ""
    check = targets.target_check(spec, room, result, filename=filename)
    if check is not None:
        out += targets.target_text(check)
    days = targets.exposures(spec, result)
    if days:
        out += targets.exposure_text(days)
    return out


def _plan(args, catalog) -> int:
    import json

    from roomcalc.engine.analysis import evaluate
    from roomcalc.io import targets
    from roomcalc.io.planning import apply_plan, resolve_goals
    from roomcalc.io.roomfile import save_spec

    spec, room = _load(args.file, catalog)
    if spec.target is None:
        print(f"roomcalc plan: {args.file} has no [target] table: say what the room must "
              "reach (criterion = \"<id>\", or rt60_max = [...], or max_level_dba = {...})",
              file=sys.stderr)
        return EXIT_INPUT
    run = targets.make_plan(spec, room, catalog, objective=args.objective, filename=args.file)
    goals = resolve_goals(spec, room, filename=args.file)
    treated = None
    if args.write:
        treated = apply_plan(spec, run.plan, list(run.candidates))
        save_spec(treated, Path(args.write))
    if args.format == "json":
        data = targets.plan_dict(run, spec.unit_system)
        if args.write:
            data["written"] = str(args.write)
        sys.stdout.write(json.dumps(data, indent=2) + "\n")
    else:
        sys.stdout.write(targets.plan_text(run, spec.unit_system, targets.window_of(goals)))
        days_before = targets.exposures(spec, run.before)
        if days_before:
            after = targets.exposures(spec, evaluate(run.after_room))
            sys.stdout.write(targets.exposure_text(days_before, after))
        if args.write:
            print(f"Treated room written to {args.write}")
    return EXIT_OK if run.plan.feasible else 1


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
    return EXIT_OK


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
