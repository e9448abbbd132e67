"""Every key, and what each number means with the formula behind it."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Markdown

HELP = """\
# roomcalc: keys and numbers
Up / Down, PageUp / PageDown (or Space), Home / End and the mouse wheel scroll this text;
Escape closes it.

## Keys
| Key | What it does |
|---|---|
| Tab / Shift+Tab | move between panels |
| 1 to 6 | the Room, Surfaces, Objects, Sources, Receivers, Treatments tabs (when the focus is not in a field) |
| Escape in a field | leave the field for its tab bar, where 1 to 6 and the other one-key shortcuts work |
| Down on a tab bar | go into the tab |
| F5 to F9 | the result tabs: reverberation, level vs distance, receivers, before/after, plan |
| Enter or click on a cell | edit it (a material cell opens the material chooser) |
| Enter / Escape in the editor line | apply / cancel |
| a | add a row after the highlighted one |
| c | copy (duplicate) the highlighted row |
| Delete or x | delete the highlighted row |
| Ctrl+Up / Ctrl+Down (or K / J) | move the row up / down |
| m | choose a material for the highlighted surface, object or treatment; on the Sources tab, a typical source (a voice, a machine, an amplifier) with its level at 1 m and spectrum (the chooser names the row it changes) |
| p | pin the room as it is now as "before"; the before/after tab compares with it |
| b | change the reverberant model: diffuse field (4/R) or Barron & Lee |
| r / Space (in the plan tab) | make the plan / tick a treatment in or out |
| Escape or Stop (in the plan tab) | stop the plan being made (other keys work meanwhile) |
| Ctrl+Z / Ctrl+Y | undo / redo |
| Ctrl+S / F2 | save / save as |
| Ctrl+O / Ctrl+N | open / new room |
| Ctrl+P | the command palette: every action by name |
| Ctrl+E (or a click on the strip at the bottom) | show every error, warning and caution in full, or fold them again |
| F1 or ? | this help |
| Ctrl+Q | quit (asks first when there are unsaved changes) |

Numbers may be typed with a decimal point or a decimal comma (9.5 or 9,5). The numbers of a
list are separated by spaces or semicolons (0,6 0,5 or 0,6; 0,5), or by a comma and a space
(0.6, 0.5).

Unsaved changes are written to a recovery file a moment after each edit. After a crash,
opening the room again offers them; "Not now" keeps them for later (Ctrl+P, "Restore changes
kept from before").

A room file with problems (an unknown material, a value out of range, a misspelled key) opens
all the same: each problem is listed at the bottom and under its table, to be fixed there, and
saving writes the room as fixed. Ctrl+P, "Fix unknown keys" reads a misspelled key as the key
it meant, or removes it.

## The numbers
- **RT60 [s]**: reverberation time, the time for sound to fall by 60 dB, per octave band, by
  Sabine `T = 0.161 V / (A + 4mV)`, Eyring `T = 0.161 V / (-S ln(1 - abar) + 4mV)`,
  Millington-Sette (per-surface logarithms), Fitzroy and Arau-Puchades (per box axis; these need
  every surface's face). `>` marks the one used, with the reason in the report; the air term
  4mV follows ISO 9613-1.
- **room constant R**: `R = S abar / (1 - abar)`, abar with air; the bigger, the deader the room.
- **mean alpha** (mean absorption coefficient): abar, the share of sound the surfaces and the
  air absorb at each reflection, from 0 (all reflected) to 1 (all absorbed).
- **air** (air absorption) [dB/km]: what the air itself absorbs, by ISO 9613-1; it matters in
  large rooms at high frequencies.
- **r_c** (critical distance): `sqrt(Q R / 16 pi)`, where direct and reverberant sound are
  equally loud. Closer than r_c the source itself dominates and absorption helps little.
- **Lw, LwA** (sound power, A-weighted sound power): what a source puts out, whatever the
  room; a source may instead be given by its level in dB(A) at 1 m (see the Sources tab).
- **Q** (directivity): how much a source favours the listeners' side: 1 in free space, 2 on
  a surface (floor or wall), 4 at an edge, 8 in a corner.
- **Lp** (sound level): sound pressure level, `Lw + 10 lg(Q / (4 pi r^2) + 4 / R)`, direct and reverberant
  parts shown; dB(A) with IEC 61672-1 weights.
- **f_S** (Schroeder frequency): `2000 sqrt(T / V)`; below it room modes dominate and these figures are rough.
- **NRC, SAA~, alpha_w**: single-number ratings of a material (ASTM C423, ISO 11654).
- **Plan** (F9): the cheapest (or smallest) set of treatments from the Treatments tab (key 6) that brings RT60 per
  band into the target window (a criterion such as DIN 18041 or ANSI S12.60, or the room file's
  own limits) and levels at receivers under their limits, by linear programming (whole units and
  panels by mixed-integer programming). "Apply to the room" makes it one undoable edit; the
  treatments it used stay in tab 6 marked Applied, and the next plan leaves them out. The plan
  is made in the background: the tab shows the step (building, solving, cutting plane k of at
  most N, checking the treated room) and the time so far; a plan made for a room that has been
  edited since is not shown as the room's and cannot be applied: press r again.
- **Daily exposure**: receivers with hours per day get LEX,8h (ISO 9612), the EU 2003/10/EC
  action values and the OSHA and NIOSH doses in the report (`roomcalc report`).
- **(stale)**: the room has a problem (shown in the strip at the bottom); the results are the
  last valid ones until it is fixed.

## Hearing and safety
Levels of 80 dB(A) or more bring a hearing caution. These are estimates: a measurement by a
competent person and the local regulations govern.

Press Escape to close.
"""


class HelpScreen(ModalScreen[None]):
    DEFAULT_CSS = """
    HelpScreen { align: center middle; }
    HelpScreen > VerticalScroll { width: 96%; height: 94%; border: thick $primary;
                                  background: $surface; }
    """
    BINDINGS = [Binding("escape,f1,q", "close", "Close", id="help.close"),
                Binding("space", "page_down", "Page down", show=False, id="help.page_down"),
                Binding("shift+space", "page_up", "Page up", show=False, id="help.page_up")]

    def compose(self) -> ComposeResult:
        # A focused scrolling container: Up/Down, PageUp/PageDown, Home/End and the mouse wheel
        # move through the text (it is longer than most terminals are tall).
        with VerticalScroll(id="help-scroll", can_focus=True):
            yield Markdown(HELP)

    def on_mount(self) -> None:
        self.query_one("#help-scroll", VerticalScroll).focus()

    def action_page_down(self) -> None:
        self.query_one("#help-scroll", VerticalScroll).scroll_page_down()

    def action_page_up(self) -> None:
        self.query_one("#help-scroll", VerticalScroll).scroll_page_up()

    def action_close(self) -> None:
        self.dismiss(None)
