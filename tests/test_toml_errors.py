"""A room file that is not readable TOML at all is refused with the file, the line and column,
and that line with a caret under the column, in the same words by ``check``, ``report``,
``check --format json`` and the interface's document (roomcalc.io.checks.toml_error).

For a list ``[``, an inline table ``{`` or a text that is never closed, the place is where it
was opened, not where the parser gave up (tomllib says "at end of document", or names the
first line of the next table). What is and is not valid TOML: the TOML 1.0.0 specification
(toml.io/en/v1.0.0): arrays may span lines, inline tables must stay on one line, basic and
literal strings end on their line. The expected lines and columns are counted by hand in the
texts below."""

from __future__ import annotations

import json

import pytest

from roomcalc.cli import main
from roomcalc.io.errors import RoomFileError
from roomcalc.io.roomfile import read_spec
from roomcalc.tui.document import Document

HEAD = 'version = 1\ntitle = "Shop"\n\n[shape]\nlength = 6.0\nwidth = 4.0\nheight = 2.7\n\n'
SURFACE = '[[surfaces]]\nname = "Walls"\nface = "front"\nmaterial = "plaster-on-masonry"\n'

CASES = {
    # An unclosed list five lines before the end: tomllib names the end of the file.
    "unclosed list": (HEAD + '[[surfaces]]\nname = "Walls"\nface = "front"\n'
                      'alpha = [0.10, 0.20, 0.30,\n  0.40, 0.50\n\n# more below\n'
                      'count = 1\n\n',
                      12, 9, "the list opened here with '[' is not closed",
                      "   12 | alpha = [0.10, 0.20, 0.30,\n"
                      "      |         ^"),
    # ... and before another table: tomllib names the next table's header.
    "unclosed list before a table": (HEAD.replace("height = 2.7", "height = [2.7,\n")
                                     + SURFACE, 7, 10,
                                     "the list opened here with '[' is not closed",
                                     "    7 | height = [2.7,\n"
                                     "      |          ^"),
    "unclosed inline table": (HEAD + SURFACE + '\n[[receivers]]\nname = "Bench"\n'
                              'distances = { "Saw" = 2.0, "Planer" = 3.5\n\n',
                              16, 13, "the inline table opened here with '{' is not closed",
                              '   16 | distances = { "Saw" = 2.0, "Planer" = 3.5\n'
                              "      |             ^"),
    "unclosed text": (HEAD.replace('title = "Shop"', 'title = "Shop') + SURFACE, 2, 9,
                      "the text opened here with '\"' is not closed",
                      '    2 | title = "Shop\n'
                      "      |         ^"),
    "unclosed multi-line text": (HEAD + SURFACE + 'name = """Walls\n\n[air]\n', 13, 8,
                                 "the text opened here with '\"\"\"' is not closed",
                                 '   13 | name = """Walls\n'
                                 "      |        ^"),
    "two equals signs": (HEAD.replace("width = 4.0", "width = = 4.0") + SURFACE, 6, 9,
                         "invalid value",
                         "    6 | width = = 4.0\n"
                         "      |         ^"),
    "a key given twice": (HEAD + SURFACE.replace('face = "front"\n',
                                                 'face = "front"\nface = "back"\n'),
                          # tomllib stops at the end of the second one's line
                          12, 14, "cannot overwrite a value",
                          '   12 | face = "back"\n'
                          "      |              ^"),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_every_way_in_names_line_column_and_shows_the_line(case, tmp_path, capsys):
    text, line, col, what, excerpt = CASES[case]
    path = tmp_path / "shop.toml"
    path.write_text(text, encoding="utf-8")
    want = f"{path}: line {line}, column {col}: not valid TOML: {what}"

    with pytest.raises(RoomFileError) as info:
        read_spec(path)
    (problem,) = info.value.problems
    assert problem.where == f"line {line}, column {col}"
    assert problem.message.startswith(f"not valid TOML: {what}")
    assert problem.excerpt == excerpt
    assert str(problem).startswith(want) and str(problem).endswith("\n" + excerpt)

    said = []
    for command in (["check", str(path)], ["report", str(path)]):
        assert main(command) == 2
        out, err = capsys.readouterr()
        assert out == "" and "Traceback" not in err
        said.append(err)
    assert said[0] == said[1] == f"{problem}\nroomcalc: 1 problem found; nothing was computed.\n"

    assert main(["check", "--format", "json", str(path)]) == 2
    data = json.loads(capsys.readouterr().out)
    assert data["problems"] == [{"file": str(path), "field": f"line {line}, column {col}",
                                 "message": problem.message, "excerpt": excerpt}]

    # The interface refuses it with the same problem (Ctrl+O shows str(problem)).
    with pytest.raises(RoomFileError) as info:
        Document.open(path)
    assert info.value.problems == (problem,)


def test_a_long_line_is_cut_around_the_column(tmp_path):
    text = HEAD + SURFACE + "alpha = [" + "0.10, " * 30 + "= 0.2]\n"
    path = tmp_path / "long.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(RoomFileError) as info:
        read_spec(path)
    (problem,) = info.value.problems
    shown, caret = problem.excerpt.split("\n")
    assert shown.startswith("   13 | ...") and len(shown) < 100
    # The caret stands under the '=' the parser stopped at.
    assert shown[caret.index("^")] == "="
