"""SPICE decks of the reviewed sub-circuits, for ngspice in batch mode (`ngspice -b DECK`).

One deck per sub-circuit the rules computed: the input network between the source and the
device's input (AC around the working frequency), the quadrature tank with its damping and
coil loss (AC around the IF), each audio RC stage and the amplifier's output side (AC over the
audio band), and the supply switch-on (transient). A deck is built from the model (parts,
nets) and the design sheet (the values the rules derived); it adds no trade arithmetic of its
own, only what laying out a netlist needs (sweep limits, a threshold voltage). Its `.measure`
lines name the sheet values they reproduce; `Deck.checks` pairs each measure with its sheet
entry, so the tests can compare the simulator with the sheet.

Text from the build file never reaches a deck raw: names become safe SPICE names
(`Names.net`, `Names.element`: letters, digits and `_` only, distinct without regard to case,
as SPICE folds case), and every comment passes `comment()` (printable ASCII on one line, no
backslash), so no name or note can start a line of its own: no element, no dot line, no
control block, no shell command.

Where format 2 selects parts by switch position, a deck states the signal and position it
stands for (`Deck.stands_for`); a plan with no selecting switch has one deck per sub-circuit
standing for every signal.
"""

from __future__ import annotations

from pathlib import Path

from speccheck.spice.audio import audio_output, rc_lowpass
from speccheck.spice.crystal import crystal
from speccheck.spice.deck import Check, Deck, Sheet
from speccheck.spice.rf import input_match, tank
from speccheck.spice.supply import switch_on
from speccheck.spice.text import Names, comment, file_word, number, safe_name

__all__ = ["Check", "Deck", "Names", "comment", "deck_path", "decks", "file_stem", "number", "safe_name"]


# ---- the whole build ------------------------------------------------------------------------

def _decks_of(build, sheet: Sheet) -> list[Deck]:
    out: list[Deck | None] = []
    for stage in build.chain:
        if stage.kind == "input-match":
            out.append(input_match(build, sheet, stage))
        elif stage.kind == "conversion" and stage.oscillator is not None:
            out.append(crystal(build, sheet, stage))
        elif stage.kind == "discriminator" and stage.tank is not None:
            out.append(tank(build, sheet, stage))
        elif stage.kind in ("audio-filter", "de-emphasis"):
            out.append(rc_lowpass(build, sheet, stage))
        elif stage.kind == "audio-amp":
            out.append(audio_output(build, sheet, stage))
    out.append(switch_on(build, sheet))
    found = [d for d in out if d is not None]
    seen: dict[str, int] = {}
    for d in found:  # two stages of one kind and label still get two files
        n = seen.get(d.label, 0)
        seen[d.label] = n + 1
        if n:
            d.label = f"{d.label}-{n + 1}"
    return found


def _configurations(build) -> list:
    """(configuration, the build as it is there) for each signal and switch position of a
    format-2 plan with selecting switches; one (None, build) for any other plan."""
    if not getattr(build, "switched", False):
        return [(None, build)]
    import importlib

    configs = importlib.import_module("speccheck.configs")  # format 2's module, needed only here
    return [(cfg, configs.view(build, cfg)) for cfg in build.configurations()]


def decks(build, sheet_entries) -> list[Deck]:
    """Every deck this build's reviewed sub-circuits and design sheet allow.

    In a plan with selecting switches each configuration (signal, switch positions, upstream
    setting) gets its own decks; a deck that comes out the same in every configuration is
    written once, standing for all of them."""
    entries = list(sheet_entries)
    per_cfg = []
    for cfg, view in _configurations(build):
        if cfg is None:
            return _decks_of(view, Sheet(entries))
        per_cfg.append((cfg, _decks_of(view, Sheet(entries, cfg.signal_name, cfg.position_label))))
    same: dict = {}
    for cfg, found in per_cfg:
        for deck in found:
            same.setdefault((deck.label, tuple(deck.lines)), []).append((cfg, deck))
    out = []
    for hits in same.values():
        cfg, deck = hits[0]
        if len(hits) == len(per_cfg):
            deck.stands_for = "every signal and switch position of this plan"
        else:
            deck.stands_for = " | ".join(c.label for c, _ in hits)
            deck.label = f"{deck.label}.{file_word(cfg.label)}"
        out.append(deck)
    return out


def file_stem(path: str | Path) -> str:
    """The safe start of every deck file name: the plan's file name without its suffix."""
    return file_word(Path(path).stem)


def deck_path(folder: str | Path, plan: str | Path, deck: Deck) -> Path:
    return Path(folder) / f"{file_stem(plan)}.{deck.label}.cir"
