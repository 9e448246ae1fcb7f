"""Decks of the RF side: the input network, the quadrature tank."""

from __future__ import annotations

import math

from speccheck.spice.deck import (
    EIGHTH_TURN,
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

# ---- input network --------------------------------------------------------------------------

def input_match(build, sheet: Sheet, stage) -> Deck | None:
    who = stage_owner(build, stage)
    f = sheet.get("input-match", who, "working frequency")
    rs = sheet.get("input-match", who, "source resistance")
    rl = sheet.get("input-match", who, "load resistance")
    topo = stage.topology
    if (
        f is None
        or rs is None
        or rl is None
        or topo not in ("series-l-shunt-c", "shunt-c-series-l", "termination", "direct")
    ):
        return None
    parts = [build.part(r) for r in stage.parts]
    coil = next((p for p in parts if p is not None and p.kind == "inductor" and p.value), None)
    cap = next((p for p in parts if p is not None and p.kind == "capacitor" and p.value), None)
    res = next((p for p in parts if p is not None and p.kind == "resistor" and p.value), None)
    names = Names(ac_grounds(build))
    src, ref, gamma = names.net("source emf"), names.net("incident"), names.net("reflection")
    deck = Deck(
        "input-match",
        file_label("input-match", who),
        f"input network of stage '{who}' ({topo})",
        stands_for(build),
    )
    lines = deck.lines
    lines.append(f"* the source: {number(rs)} ohm behind an EMF of 2 V, so that 1 V reaches a matched load")
    if topo in ("series-l-shunt-c", "shunt-c-series-l"):
        if coil is None or cap is None:
            return None
        shared = [n for n in coil.ends if n in cap.ends]
        mid = shared[0] if shared else "network middle"
        far = coil.other_end(mid) if shared else "network input"
        port, load = (far, mid) if topo == "series-l-shunt-c" else (mid, far)
        port_node, load_node = names.net(port or "port"), names.net(load or "load")
        shunt_node = load_node if topo == "series-l-shunt-c" else port_node
        lines += [
            f"V_SOURCE {src} 0 DC 0 AC 2",
            f"{names.element('R', 'source')} {src} {port_node} {number(rs)}",
            f"* {comment(described(coil))}",
            f"{names.element('L', coil.name)} {port_node} {load_node} {number(coil.value.si)}",
            f"* {comment(described(cap))}",
            f"{names.element('C', cap.name)} {shunt_node} 0 {number(cap.value.si)}",
        ]
        deck.notes.append(f"parts: {coil.name} series, {cap.name} shunt; the device input as a resistor")
    elif topo == "termination":
        if res is None:
            return None
        port = next((n for n in res.ends if n not in names.grounds), "port")
        port_node = load_node = names.net(port)
        lines += [
            f"V_SOURCE {src} 0 DC 0 AC 2",
            f"{names.element('R', 'source')} {src} {port_node} {number(rs)}",
            f"* {comment(described(res))}",
            f"{names.element('R', res.name)} {port_node} 0 {number(res.value.si)}",
        ]
    else:
        port_node = load_node = names.net(stage.device or "port")
        lines += [
            f"V_SOURCE {src} 0 DC 0 AC 2",
            f"{names.element('R', 'source')} {src} {port_node} {number(rs)}",
        ]
    dev = build.device(stage.device)
    lines += [
        (
            "* the device input "
            f"({comment(dev.name + ', ' + dev.profile.name) if dev and dev.profile else 'load'}): "
            f"{number(rl)} ohm"
        ),
        f"{names.element('R', 'load')} {load_node} 0 {number(rl)}",
        "* reflection coefficient: the port voltage less the 1 V incident wave",
        f"V_INCIDENT {ref} 0 DC 0 AC 1",
        f"E_REFLECTION {gamma} 0 {port_node} {ref} 1",
        # 401 points from 0.8 f to 1.2 f: the working frequency is a point of the sweep
        f".ac lin 401 {number(0.8 * f)} {number(1.2 * f)}",
        f".save v({port_node}) v({load_node}) v({gamma})",
    ]
    at = number(f)
    two = "(2-port_re)"
    den = f"({two}*{two}+port_im*port_im)"
    lines += [
        f".measure ac port_re find vr({port_node}) at={at}",
        f".measure ac port_im find vi({port_node}) at={at}",
        f".measure ac zin_re param='{number(rs)}*(port_re*{two}-port_im*port_im)/{den}'",
        f".measure ac zin_im param='{number(rs)}*2*port_im/{den}'",
        f".measure ac gamma_db find vdb({gamma}) at={at}",
        ".measure ac return_loss param='-gamma_db'",
        f".measure ac gamma_mag find vm({gamma}) at={at}",
        ".measure ac vswr param='(1+gamma_mag)/(1-gamma_mag)'",
    ]
    sheet.check(deck, "zin_re", "input-match", who, "impedance seen by the source (real)")
    sheet.check(deck, "zin_im", "input-match", who, "impedance seen by the source (imaginary)")
    sheet.check(deck, "return_loss", "input-match", who, "return loss")
    sheet.check(deck, "vswr", "input-match", who, "VSWR")
    if topo == "termination":
        lines += [
            f".measure ac load_db find vdb({load_node}) at={at}",
            f".measure ac termination_loss param='-load_db-10*log10({number(rs)}/{number(rl)})'",
        ]
        sheet.check(deck, "termination_loss", "input-match", who, "signal lost in the termination")
    return deck


# ---- quadrature tank ------------------------------------------------------------------------


def _extremes(part) -> tuple[float, float] | None:
    """The lowest and highest value of a part: its adjust range, else its tolerance."""
    if part.adjust is not None and part.adjust.min is not None and part.adjust.max is not None:
        a, b = part.adjust.min.si, part.adjust.max.si
        return min(a, b), max(a, b)
    if part.tolerance is not None and part.value is not None:
        v, t = part.value.si, abs(part.tolerance.si)
        return v * (1 - t), v * (1 + t)
    return None


def tank(build, sheet: Sheet, stage) -> Deck | None:
    tank = stage.tank
    coil, cap = build.part(tank.inductor), build.part(tank.capacitor)
    if coil is None or cap is None or coil.value is None or cap.value is None:
        return None
    who = stage_owner(build, stage)
    f0 = sheet.get("discriminator", who, "tank resonance f0")
    if f0 is None:
        return None
    names = Names(ac_grounds(build))
    hot = next((e for e in coil.ends if "." in e and e not in names.grounds), coil.ends[0])
    ret = coil.other_end(hot) or "tank return"
    hot_node, ret_node = names.net(hot), names.net(ret)
    deck = Deck(
        "tank",
        file_label("tank", who) if who != "discriminator" else "tank",
        f"quadrature tank of stage '{who}'",
        stands_for(build),
    )
    lines = deck.lines
    damping = build.part(tank.damping)
    extra = tank.extra_capacitance.si if tank.extra_capacitance is not None else 0.0
    L, C = coil.value.si, cap.value.si
    lines += [
        "* driven by a 1 A test current at the device pin: the node voltage is the tank's impedance",
        f"I_DRIVE 0 {hot_node} DC 0 AC 1",
        f"* {comment(described(coil))}",
        f"{names.element('L', coil.name)} {hot_node} {ret_node} {number(L)}",
        f"* {comment(described(cap))}",
        f"{names.element('C', cap.name)} {hot_node} {ret_node} {number(C)}",
    ]
    if extra:
        lines.append(f"{names.element('C', 'extra')} {hot_node} {ret_node} {number(extra)}")
    if damping is not None and damping.value is not None:
        for resistor in members(build, damping):
            lines += [
                f"* {comment(described(resistor))}",
                f"{names.element('R', resistor.name)} {hot_node} {ret_node} {number(resistor.value.si)}",
            ]
    if coil.q:
        # the coil's loss as its parallel equivalent at the tank's f0: Q * 2 pi f0 L
        lines += [
            f"* {comment(coil.name)} loss: unloaded Q {number(coil.q)} as a parallel resistance at f0",
            (
                f"{names.element('R', coil.name + '_loss')} {hot_node} {ret_node} "
                f"{number(coil.q * 2 * math.pi * f0 * L)}"
            ),
        ]
    if ret_node != "0":
        lines.append(f"* the return net {comment(ret)} and what joins it to a rail or ground")
        for part in build.nets.parts_on(ret):
            other = part.other_end(ret)
            if (
                part in (coil, cap, damping)
                or other is None
                or other not in names.grounds
                or part.value is None
            ):
                continue
            letter = {"resistor": "R", "capacitor": "C", "inductor": "L"}.get(part.kind)
            if letter:
                lines += [
                    f"* {comment(described(part))}",
                    f"{names.element(letter, part.name)} {ret_node} 0 {number(part.value.si)}",
                ]
    lines.append(f".save v({hot_node})")
    lines += [
        f".measure ac f0 when vp({hot_node})=0",
        f".measure ac f_lo when vp({hot_node})={number(EIGHTH_TURN)}",
        f".measure ac f_hi when vp({hot_node})={number(-EIGHTH_TURN)}",
        ".measure ac linear_range param='f_hi-f_lo'",
        ".measure ac loaded_q param='f0/(f_hi-f_lo)'",
    ]
    sheet.check(deck, "f0", "discriminator", who, "tank resonance f0")
    if sheet.check(deck, "loaded_q", "discriminator", who, "loaded Q"):
        deck.notes.append("half-power points: where the tank's phase is +/-45 degrees (|Z| 3 dB down)")
    sheet.check(deck, "linear_range", "discriminator", who, "linear range (f0/Q)")
    lowest, highest = f0, f0
    coil_range, cap_range = _extremes(coil), _extremes(cap)
    if coil_range or cap_range:
        (l_lo, l_hi), (c_lo, c_hi) = coil_range or (L, L), cap_range or (C, C)
        deck.notes.append(
            "two more copies of the tank at the ends of its adjustment (or tolerance), "
            "returned to ground, give the tuning range"
        )
        for end, (l_val, c_val) in (("low", (l_hi, c_hi)), ("high", (l_lo, c_lo))):
            node = names.net(f"tuned {end}")
            lines += [
                f"* the tank tuned to its {end} end",
                f"{names.element('I', 'drive ' + end)} 0 {node} DC 0 AC 1",
                f"{names.element('L', coil.name + ' ' + end)} {node} 0 {number(l_val)}",
                f"{names.element('C', cap.name + ' ' + end)} {node} 0 {number(c_val + extra)}",
                f"{names.element('R', 'tuning ' + end)} {node} 0 {number(1e6)}",
                f".save v({node})",
                f".measure ac f_tune_{end} when vp({node})=0",
            ]
            sheet.check(deck, f"f_tune_{end}", "discriminator", who, f"tuning range {end}")
            f_end = sheet.get("discriminator", who, f"tuning range {end}")
            if f_end:
                lowest, highest = min(lowest, f_end), max(highest, f_end)
    # a log sweep a decade either side: 10000 points a decade keep the measures well inside 0.1 %
    lines.insert(0, f".ac dec 10000 {number(lowest / 10)} {number(highest * 10)}")
    return deck
