"""Decks of the audio side: RC low-pass and de-emphasis stages (with an as-wired copy), the
amplifier's output side."""

from __future__ import annotations

import math

from speccheck.loads import PASSIVE, load_on
from speccheck.spice.deck import (
    HALF_POWER_DB,
    Deck,
    Sheet,
    ac_grounds,
    described,
    file_label,
    members,
    stage_owner,
    stands_for,
)
from speccheck.spice.text import Names, comment, number

# ---- audio ----------------------------------------------------------------------------------

def rc_lowpass(build, sheet: Sheet, stage) -> Deck | None:
    res, cap = build.part(stage.resistor), build.part(stage.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None  # a stage given as a time constant or a corner has no parts to simulate
    who = stage_owner(build, stage)
    corner_name = "de-emphasis corner" if stage.kind == "de-emphasis" else "low-pass corner"
    corner = sheet.get("audio", who, corner_name)
    if corner is None:
        return None
    names = Names(ac_grounds(build))
    caps = members(build, cap)
    shared = [n for n in res.ends if any(n in c.ends for c in caps)]
    out = shared[0] if shared else "filter output"
    inp = res.other_end(out) if shared else "filter input"
    in_node, out_node = names.net(inp or "filter input"), names.net(out)
    deck = Deck("audio-rc", file_label(stage.kind, who), f"{stage.kind} RC of stage '{who}'",
                stands_for(build))
    deck.lines += ["* the detector's audio output as an ideal source of 1 V",
                   f"V_DRIVE {in_node} 0 DC 0 AC 1",
                   f"* {comment(described(res))}",
                   f"{names.element('R', res.name)} {in_node} {out_node} {number(res.value.si)}",
                   *(line for c in caps for line in (
                       f"* {comment(described(c))}",
                       f"{names.element('C', c.name)} {out_node} 0 {number(c.value.si)}")),
                   f".ac dec 1000 {number(corner / 100)} {number(corner * 100)}",
                   f".save v({out_node})",
                   f".measure ac corner when vdb({out_node})={number(HALF_POWER_DB)} cross=1"]
    deck.notes.append("the RC as the design sheet takes it: driven from an ideal source, into no load")
    sheet.check(deck, "corner", "audio", who, corner_name)
    if stage.kind == "de-emphasis":
        deck.lines.append(".measure ac time_constant param='1/(6.28318530718*corner)'")
        sheet.check(deck, "time_constant", "audio", who, "de-emphasis time constant")
    if shared:
        what = "de-emphasis" if stage.kind == "de-emphasis" else "low-pass"
        _as_wired(build, deck, names, res, cap, inp or "filter input", out, corner, sheet, who, what)
    return deck


def _as_wired(build, deck: Deck, names: Names, res, cap, inp: str, out: str, corner: float, sheet: Sheet,
              who: str, what: str):
    """A second copy of an RC stage with the parts that load its output, as the nets show them
    (coupling capacitors and all). Where the rule found the load a plain resistance, the sheet's
    corner as wired (1/(2 pi (R || R_L) C)) and its flat loss are measured here: the loss a decade
    below the RC's own corner, the corner where the response has fallen 3 dB below the sheet's
    flat level."""
    load = load_on(build, out, {res.name, cap.name, *(p.name for p in members(build, cap))})
    if not load:
        return

    def node(net):
        return "0" if net in names.grounds else names.net(f"wired {net}")
    drive = names.element("V", "drive wired")
    deck.lines += [(f"* as wired: the same RC with what loads {comment(out)} on the plan's nets "
                   "(rails as AC ground, device pins open)"),
                   f"{drive} {node(inp)} 0 DC 0 AC 1",
                   f"{names.element('R', res.name + ' wired')} {node(inp)} {node(out)} "
                   f"{number(res.value.si)}",
                   *(f"{names.element('C', c.name + ' wired')} {node(out)} 0 {number(c.value.si)}"
                     for c in members(build, cap))]
    for part in load:
        deck.lines += [f"* {comment(described(part))}",
                       (f"{names.element(PASSIVE[part.kind], part.name + ' wired')} {node(part.ends[0])} "
                       f"{node(part.ends[1])} {number(part.value.si)}")]
    listed = ", ".join(p.name for p in load)
    deck.lines.append(f".save v({node(out)})")
    wired = sheet.get("audio", who, f"{what} corner as wired")
    loss = sheet.get("audio", who, f"{what} passband loss as wired")
    if wired is not None and loss is not None:
        # the flat level a decade below the RC's own corner: below the load's coupling corner the
        # load falls away and the level rises again, so the response's maximum is not the passband
        deck.lines += [f".measure ac passband_as_wired_db find vdb({node(out)}) at={number(corner / 10)}",
                       ".measure ac passband_loss_as_wired param='-passband_as_wired_db'",
                       (f".measure ac corner_as_wired when vdb({node(out)})={number(HALF_POWER_DB - loss)} "
                        "fall=1")]
        sheet.check(deck, "passband_loss_as_wired", "audio", who, f"{what} passband loss as wired")
        sheet.check(deck, "corner_as_wired", "audio", who, f"{what} corner as wired")
        deck.notes.append(f"as wired, {listed} load the output: the sheet's corner and flat loss as wired "
                          "are measured on this copy")
        return
    deck.lines += [f".measure ac passband_as_wired_db find vdb({node(out)}) at={number(corner / 10)}",
                   f".measure ac at_corner_as_wired_db find vdb({node(out)}) at={number(corner)}"]
    deck.notes.append(f"as wired, {listed} load the output, not as a plain resistance (see the design "
                      "sheet); compare at_corner_as_wired_db with passband_as_wired_db")


def audio_output(build, sheet: Sheet, stage) -> Deck | None:
    cap, load = build.part(stage.coupling), build.part(stage.load)
    net = stage.output_network
    res_n = build.part(net.resistor) if net is not None else None
    cap_n = build.part(net.capacitor) if net is not None else None
    label = stage.label  # the audio rules publish under the stage label
    names = Names(ac_grounds(build))
    deck = Deck(
        "audio-output",
        "audio-output" if label == "audio-amp" else file_label("audio-output", label),
        f"amplifier output side of stage '{label}'",
        stands_for(build),
    )
    lowest, highest = math.inf, 0.0
    drive = None
    coupling_ok = (
        cap is not None
        and load is not None
        and cap.kind == "capacitor"
        and cap.value is not None
        and load.value is not None
        and load.kind in ("speaker", "resistor")
    )
    if coupling_ok:
        corner = sheet.get("audio", label, f"coupling {cap.name} into {load.name} corner")
        shared = [n for n in cap.ends if n in load.ends]
        if corner is not None and shared and load.other_end(shared[0]) in names.grounds:
            spk = shared[0]
            drive = cap.other_end(spk)
            drive_node, spk_node = names.net(drive or "amplifier output"), names.net(spk)
            deck.lines += [
                "* the amplifier output as an ideal source of 1 V",
                f"V_AMP {drive_node} 0 DC 0 AC 1",
                f"* {comment(described(cap))}",
                f"{names.element('C', cap.name)} {drive_node} {spk_node} {number(cap.value.si)}",
                f"* {comment(described(load))}: its nominal impedance as a resistor",
                (
                    f"{names.element('R', load.name)} {spk_node} "
                    f"{names.net(load.other_end(spk) or '0')} {number(load.value.si)}"
                ),
                f".save v({spk_node})",
                f".measure ac coupling_corner when vdb({spk_node})={number(HALF_POWER_DB)} cross=1",
            ]
            sheet.check(
                deck, "coupling_corner", "audio", label, f"coupling {cap.name} into {load.name} corner"
            )
            lowest, highest = min(lowest, corner), max(highest, corner)
    if res_n is not None and cap_n is not None and res_n.value is not None and cap_n.value is not None:
        turnover = sheet.get("audio", label, f"output network {res_n.name} + {cap_n.name} turnover")
        mid = [n for n in res_n.ends if n in cap_n.ends]
        if turnover is not None and mid:
            # the part on the amplifier output comes first (the resistor when neither is on it)
            first = next((p for p in (res_n, cap_n) if drive is not None and drive in p.ends), res_n)
            second = cap_n if first is res_n else res_n
            start = drive if drive is not None and drive in first.ends else first.other_end(mid[0])
            start_node = names.net(start or "amplifier output")
            if drive is None or start != drive:
                deck.lines += [
                    "* the amplifier output as an ideal source of 1 V",
                    f"{names.element('V', 'network drive')} {start_node} 0 DC 0 AC 1",
                ]
            mid_node = names.net(mid[0])
            letter = {"resistor": "R", "capacitor": "C"}
            deck.lines += [
                f"* output network: {comment(described(first))}",
                (
                    f"{names.element(letter[first.kind], first.name)} {start_node} {mid_node} "
                    f"{number(first.value.si)}"
                ),
                f"* {comment(described(second))}",
                f"{names.element(letter[second.kind], second.name)} {mid_node} 0 {number(second.value.si)}",
                f".save v({mid_node})",
                "* the turnover: where the voltage across the capacitor is 3 dB down from the whole",
                f".measure ac network_turnover when vdb({mid_node})={number(HALF_POWER_DB)} cross=1",
            ]
            sheet.check(
                deck,
                "network_turnover",
                "audio",
                label,
                f"output network {res_n.name} + {cap_n.name} turnover",
            )
            lowest, highest = min(lowest, turnover), max(highest, turnover)
    if not deck.checks:
        return None
    deck.lines.insert(0, f".ac dec 1000 {number(lowest / 100)} {number(highest * 100)}")
    deck.notes.append("the speaker as its nominal impedance, the amplifier as an ideal voltage source")
    return deck
