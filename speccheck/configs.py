"""What is in circuit for each signal and switch position (format v2).

A v2 build may have selector switches (parts with poles and positions) and a source with
selectable bandwidths. Each signal is received in some positions of each switch and with one
bandwidth setting: a *configuration*. Rules whose verdict depends on what is in circuit run
once per configuration on a *view* of the build: a shallow copy holding only the parts in
circuit there, the IF path selected, listed parts (damping resistors, filter capacitors)
reduced to those in circuit and combined, the chosen upstream bandwidth, and its own net graph
with each switch's common joined to the selected throw.

A build with no selector switch and no bandwidth settings (every v1 file) is not switched: the
rules run once on the build itself, exactly as before.
"""

from __future__ import annotations

import copy
import itertools
import math
import weakref
from dataclasses import dataclass
from typing import Any

from speccheck.findings import Finding

# Rules whose verdict depends on what is in circuit: run per configuration in a switched build.
PER_CONFIGURATION = {
    "freqplan.conversion",
    "freqplan.filter-fit",
    "freqplan.image",
    "freqplan.path-width",
    "freqplan.upstream-bandwidth",
    "freqplan.mixer-spurs",
    "freqplan.tank-tuning",
    "freqplan.tank-range",
    "freqplan.de-emphasis",
    "freqplan.audio-corner",
    "rfpath.gain-ahead",
    "rfpath.max-input",
    "tap.loading",
}

MAX_CONFIGURATIONS = 64  # a plan with more combinations is checked on the first ones only


@dataclass(frozen=True)
class Configuration:
    signal: Any  # a model Signal, or None when the build declares none
    positions: tuple  # ((switch ref, position), ...) in switch order
    upstream: str | None  # the source bandwidth setting's name
    unstated: tuple = ()  # switches the signal does not name (taken in every position)

    @property
    def signal_name(self) -> str:
        return str(self.signal.name) if self.signal is not None else ""

    @property
    def position_label(self) -> str:
        words = [f"{ref} {pos}" for ref, pos in self.positions]
        if self.upstream:
            words.append(f"upstream {self.upstream}")
        return "; ".join(words)

    @property
    def label(self) -> str:
        return "; ".join(w for w in (self.signal_name, self.position_label) if w)

    def position(self, switch: str) -> str | None:
        return dict(self.positions).get(switch)

    def selects(self, selection: dict) -> bool:
        """True when every switch a selection names sits at one of its positions."""
        chosen = dict(self.positions)
        return all(chosen.get(ref) in positions for ref, positions in selection.items() if ref in chosen)


_CONFIGS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def selectors(build) -> list:
    return [p for p in build.parts.values() if p.selector]


def _every_configuration(build):
    """(total count, lazy iterator) of every (signal, switch positions, upstream setting)."""
    switches = selectors(build)
    settings = list(build.source.bandwidth_settings) if build.source is not None else []
    plans = []
    for sig in build.signals or [None]:
        choices, unstated = [], []
        for sw in switches:
            named = sig.positions_of(sw.name) if sig is not None else []
            named = [p for p in named if p in sw.positions] or list(sw.positions)
            if sig is None or not sig.positions_of(sw.name):
                unstated.append(sw.name)
            choices.append([(sw.name, p) for p in named])
        if sig is not None and sig.upstream in settings:
            ups = [sig.upstream]
        else:
            ups = settings or [None]
        plans.append((sig, choices, ups, tuple(unstated)))
    total = sum(math.prod(len(c) for c in choices) * len(ups) for _, choices, ups, _ in plans)
    every = (Configuration(sig, tuple(combo), up, unstated)
             for sig, choices, ups, unstated in plans
             for combo in itertools.product(*choices) for up in ups)
    return total, every


def configurations(build) -> list:
    """Every (signal, switch positions, upstream setting) the plan receives, in plan order; no
    more than MAX_CONFIGURATIONS (configuration_count says how many there are)."""
    cached = _CONFIGS.get(build)
    if cached is not None:
        return cached
    _, every = _every_configuration(build)
    out = list(itertools.islice(every, MAX_CONFIGURATIONS))  # lazily: a huge product is never built
    _CONFIGS[build] = out
    return out


def configuration_count(build) -> int:
    """How many (signal, positions, upstream setting) combinations the plan has, checked or not."""
    return _every_configuration(build)[0]


# ---- what is in circuit ----------------------------------------------------------------


def out_of_circuit(build, cfg: Configuration | None) -> set:
    """Refs of the parts out of circuit in a configuration (none without one).

    A part is out when its `in_circuit` selection does not hold, or when it hangs on a switch
    net the position leaves open (an unselected throw, or the common of a pole with no throw
    there) with no other part on that net; a part then left hanging by one terminal is out too.
    A net that rails, declared nodes or device pins hold never hangs. Where this reading is not
    what is built (two parts on an open throw), `in_circuit:` on the part says it plainly.
    """
    if cfg is None:
        return set()
    out = {p.name for p in build.parts.values() if p.in_circuit and not cfg.selects(p.in_circuit)}
    fixed = set(build.rails) | set(build.nodes)

    def floating(net) -> bool:  # a net nothing but the switch holds: rails, nodes and pins never float
        return bool(net) and net not in fixed and "." not in net

    users: dict = {}
    for part in build.parts.values():
        if part.selector:
            continue
        for net in set(part.terminals.values()):
            users.setdefault(net, []).append(part)

    def hanging(net) -> bool:  # at most one part left on a net nothing fixed holds
        return floating(net) and len([p for p in users.get(net, ()) if p.name not in out]) <= 1

    dead: set = set()
    joined: set = set()  # nets a pole connects in this position
    for sw in selectors(build):
        here = cfg.position(sw.name)
        for pole in sw.poles.values():
            chosen = pole.throws.get(here)
            if chosen is not None:
                joined |= {chosen, pole.common}
            loose = [net for net in pole.throws.values() if net not in (chosen, pole.common)]
            if chosen is None:
                loose.append(pole.common)  # the pole is open in this position
            dead |= {net for net in loose if hanging(net)}
    changed = True
    while changed:
        changed = False
        for part in build.parts.values():
            if part.name in out or part.selector:
                continue
            if any(net in dead for net in part.terminals.values()):
                out.add(part.name)
                changed = True
                for net in part.terminals.values():
                    if net not in dead and net not in joined and hanging(net):
                        dead.add(net)
    return out


def path_in_circuit(path, cfg: Configuration | None, out: set) -> bool:
    if cfg is None:
        return True
    if path.in_circuit:
        return cfg.selects(path.in_circuit)
    for ref in (path.filter, path.bypass):
        if ref:
            return ref not in out
    return True


# ---- combined stand-ins ------------------------------------------------------------------


def _combined(build, refs: list):
    """One stand-in part for several acting together: resistors in parallel, capacitors summed."""
    parts = [build.parts.get(r) for r in refs]
    parts = [p for p in parts if p is not None]
    if not parts:
        return None
    if len(parts) == 1:
        return parts[0]
    first = parts[0]
    stand_in = copy.copy(first)
    stand_in.name = "+".join(p.name for p in parts)
    stand_in.combined_from = tuple(p.name for p in parts)
    stand_in.ends, stand_in.terminals, stand_in.adjust, stand_in.tolerance = [], {}, None, None
    values = [p.value for p in parts]
    if all(v is not None for v in values):
        if first.kind in ("resistor", "potentiometer"):
            si = 1.0 / sum(1.0 / v.si for v in values)
        else:  # capacitors in parallel add
            si = sum(v.si for v in values)
        text = " || ".join(v.text for v in values)
        stand_in.value = type(first.value)(si, first.value.dim, text, first.value.src, first.value.doc_path)
    else:
        stand_in.value = None
    return stand_in


def _resolve_choices(view, holder, out: set):
    for name, refs in holder.choices.items():
        live = [r for r in refs if r not in out]
        if not live:
            setattr(holder, name, None)
            continue
        stand_in = _combined(view, live)
        setattr(holder, name, stand_in.name if stand_in is not None else None)
        if stand_in is not None and stand_in.combined_from:
            listed = holder.places.get(name)
            if listed is not None:  # findings about the stand-in point at the list that made it
                stand_in.doc_path = listed
                stand_in.places = dict.fromkeys(("value", "ends", "kind"), listed)
            view.combined[stand_in.name] = stand_in


def prepare(build):
    """Stand-ins for listed parts on the build itself (all of them in circuit)."""
    for stage in build.chain:
        for holder in (stage, stage.tank):
            if holder is not None and holder.choices:
                _resolve_choices(build, holder, set())


# ---- capacitors on an RC node that the stage does not list ------------------------------------

RC_STAGES = ("audio-filter", "de-emphasis")  # an R feeding a node with C to ground: the C's all count


def _through_switches(build, cfg: Configuration, node: str) -> dict:
    """Nets joined to `node` by the poles of the selectors in this configuration -> the words
    saying how ("" for the node itself, "S2 narrow" for a throw)."""
    reached = {node: ""}
    changed = True
    while changed:
        changed = False
        for sw in selectors(build):
            here = cfg.position(sw.name)
            for pole in sw.poles.values():
                chosen = pole.throws.get(here)
                if chosen is None:
                    continue
                for a, b in ((pole.common, chosen), (chosen, pole.common)):
                    if a in reached and b not in reached:
                        reached[b] = f"{sw.name} {here}"
                        changed = True
    return reached


def _count_unlisted(view, build, stage, s, cfg: Configuration) -> None:
    """Count with the stage's capacitor every other capacitor in circuit from its node to ground
    (directly or through a switch's selected throw): they are in parallel on the bench."""
    listed = list(stage.choices.get("capacitor") or ([stage.capacitor] if stage.capacitor else []))
    grounds = {name for name, rail in build.rails.items() if rail.is_ground}
    first = next((build.parts[r] for r in listed if r in build.parts), None)
    if first is None or s.capacitor is None:
        return
    node = next((n for n in first.terminals.values() if n not in grounds), None)
    if node is None:
        return
    nets = _through_switches(build, cfg, node)
    extra = []
    for part in view.parts.values():
        ends = set(part.terminals.values())
        if part.kind != "capacitor" or part.name in listed or len(ends) != 2 or not ends & grounds:
            continue
        on = next((n for n in ends if n in nets), None)
        if on is not None:
            extra.append((part.name, node, nets[on]))
    if not extra:
        return
    live = [r for r in listed if r in view.parts] + [ref for ref, _, _ in extra]
    stand_in = _combined(view, live)
    if stand_in is None:
        return
    if stand_in.combined_from:
        listed_at = stage.places.get("capacitor")
        if listed_at is not None:
            stand_in.doc_path = listed_at
            stand_in.places = dict.fromkeys(("value", "ends", "kind"), listed_at)
        view.combined[stand_in.name] = stand_in
    s.capacitor, s.unlisted = stand_in.name, tuple(extra)


# ---- the view of one configuration ---------------------------------------------------------

_VIEWS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def view(build, cfg: Configuration):
    """The build as it is in one configuration (cached per build)."""
    views = _VIEWS.setdefault(build, {})
    found = views.get(cfg)
    if found is not None:
        return found
    out = out_of_circuit(build, cfg)
    v = copy.copy(build)
    v.__dict__.pop("nets", None)  # the cached net graph of the whole build
    v.configuration, v.selected = cfg, dict(cfg.positions)
    v.signals = [cfg.signal] if cfg.signal is not None else []
    v.parts = {k: p for k, p in build.parts.items() if k not in out}
    v.combined = {}
    v.chain = []
    for stage in build.chain:
        s = copy.copy(stage)
        if stage.paths:
            s.paths = {k: p for k, p in stage.paths.items() if path_in_circuit(p, cfg, out)}
        if stage.tank is not None:
            s.tank = copy.copy(stage.tank)
            _resolve_choices(v, s.tank, out)
        _resolve_choices(v, s, out)
        if s.kind in RC_STAGES:
            _count_unlisted(v, build, stage, s, cfg)
        v.chain.append(s)
    if cfg.upstream and build.source is not None:
        v.source = copy.copy(build.source)
        v.source.bandwidth = build.source.bandwidth_settings[cfg.upstream]
        v.source.places = {
            **build.source.places,
            "bandwidth": build.source.places.get("bandwidth_settings", ()) + (cfg.upstream,),
        }
    views[cfg] = v
    return v


def base(build):
    """What rules that do not depend on the configuration see: the build itself."""
    return build


# ---- references (v2 keys) --------------------------------------------------------------------


def check_references(build, findings: list):
    def bad(message: str, loc):
        findings.append(
            Finding(
                "input.reference",
                "error",
                message,
                loc,
                stage="input",
                fix="Declare the switch, position or setting, or correct the name.",
            )
        )

    switches = {p.name: p for p in selectors(build)}
    for part in build.parts.values():
        if part.kind == "switch" and part.poles:
            for pole in part.poles.values():
                for position in pole.throws:
                    if position not in part.positions:
                        bad(
                            f"{part.name} pole {pole.name} has a throw for '{position}', which is not one "
                            f"of its positions ({', '.join(part.positions) or 'none listed'})",
                            pole.at("throws"),
                        )
        if part.wiper and part.kind != "potentiometer":
            bad(f"{part.name} is a {part.kind}: only a potentiometer has a wiper", part.at("wiper"))
    for holder in [*build.parts.values(), *(p for st in build.chain for p in st.paths.values())]:
        for ref, positions in holder.in_circuit.items():
            _check_selection(switches, ref, positions, holder, "in_circuit", bad)
    for stage in build.chain:
        if stage.pin:
            _check_pin(build, stage.pin, stage, "pin", bad)
    kinds = {s.kind for s in build.chain} | {s.name for s in build.chain if s.name}
    for tap in build.taps:
        if tap.net and "." in tap.net:
            _check_pin(build, tap.net, tap, "net", bad)
        for name in ("series", "coupling"):
            ref = getattr(tap, name)
            if ref and ref not in build.parts:
                bad(f"tap {tap.name}: part '{ref}' is not declared", tap.at(name))
        series = build.parts.get(tap.series) if tap.series else None
        if series is not None and series.kind not in ("resistor", "potentiometer"):
            # tap.loading adds the series part's value to the load in ohms
            bad(f"tap {tap.name}: series part '{tap.series}' is a {series.kind}, not a resistor",
                tap.at("series"))
        if tap.after and tap.after not in kinds:
            bad(
                f"tap {tap.name} is taken after '{tap.after}', which is no stage of the chain",
                tap.at("after"),
            )
    settings = build.source.bandwidth_settings if build.source is not None else {}
    for sig in build.signals:
        for ref in sig.switches if isinstance(sig.switches, dict) else {}:
            _check_selection(switches, str(ref), sig.positions_of(str(ref)), sig, "switches", bad)
        if sig.upstream and sig.upstream not in settings:
            bad(
                f"signal {sig.name} names upstream setting '{sig.upstream}', which "
                f"source.bandwidth_settings does not declare ({', '.join(settings) or 'none'})",
                sig.at("upstream"),
            )


def _check_pin(build, net: str, holder, field: str, bad):
    device, _, pin = net.partition(".")
    dev = build.devices.get(device)
    if dev is None:
        bad(f"device '{device}' is not declared", holder.at(field))
    elif dev.profile is not None and pin not in dev.profile.pins:
        bad(f"{dev.name} ({dev.profile.name}) has no pin '{pin}'", holder.at(field))


def _check_selection(switches: dict, ref: str, positions: list, holder, field: str, bad):
    sw = switches.get(ref)
    if sw is None:
        bad(
            f"'{ref}' is not a selector switch (a part of kind switch with poles and positions)",
            holder.at(field),
        )
        return
    for position in positions:
        if position not in sw.positions:
            bad(f"{ref} has no position '{position}' (it has {', '.join(sw.positions)})", holder.at(field))
