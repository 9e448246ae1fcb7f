"""The typed, unit-converted model of one build plan. Rules read this, never raw YAML.

Every quantity is a `Q`: its value in SI units (°C for temperatures, dBm for levels, dB for
gains), the dimension it was checked for, the text the user wrote and where (`q.loc`). Every model
object knows the position of each of its fields (`obj.at("field")`), so a rule can point a
finding at the exact value it is about.

Field metadata says how the loader fills a field: `dim` for a quantity, `node` for a nested
object, `nodes` for a mapping of objects keyed by name, `items` for a list of objects, `key`
when the YAML key differs from the Python name, `derived` for a field the loader computes
(never read from the file).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property
from typing import Any

from speccheck import units
from speccheck.findings import Location

NOWHERE = Location("")


@dataclass(frozen=True, slots=True)
class Q:
    si: float
    dim: str
    text: str
    src: Any = field(default=None, repr=False, compare=False)  # the loader's position source
    doc_path: tuple = field(default=(), repr=False, compare=False)

    @property
    def loc(self) -> Location:
        return self.src.loc(self.doc_path) if self.src is not None else NOWHERE

    @property
    def unit(self) -> str:
        return units.symbol(self.dim)

    def __str__(self) -> str:
        return self.text


def qty(dim: str, key: str | None = None):
    return field(default=None, metadata={"dim": dim, **({"key": key} if key else {})})


def sub(cls, key: str | None = None):
    return field(default=None, metadata={"node": cls, **({"key": key} if key else {})})


def named(cls):
    return field(default_factory=dict, metadata={"nodes": cls})


def items(cls):
    return field(default_factory=list, metadata={"items": cls})


def plain(default=None, key: str | None = None):
    if isinstance(default, (list, dict)):
        factory = type(default)
        return field(default_factory=factory, metadata={"key": key} if key else {})
    return field(default=default, metadata={"key": key} if key else {})


@dataclass(eq=False)
class Located:
    """Knows where it and each of its fields sit in the file. Positions become Locations only
    when asked for (most are never pointed at), through `src`, the loader's position source."""

    src: Any = field(default=None, repr=False)
    doc_path: tuple = field(default=(), repr=False)
    places: dict = field(default_factory=dict, repr=False)  # field name -> document path of its value

    @property
    def loc(self) -> Location:
        return self.src.loc(self.doc_path) if self.src is not None else NOWHERE

    def at(self, name: str) -> Location:
        path = self.places.get(name)
        return self.src.loc(path) if path is not None else self.loc

    def given(self, name: str) -> bool:
        return name in self.places


# ---- build, signals, source ------------------------------------------------------------

@dataclass(eq=False)
class BuildInfo(Located):
    name: str = plain("")
    purpose: str = plain("")
    ambient_max: Q = qty("temperature")
    lowest_audio: Q = qty("frequency")
    region: str = plain(None)


@dataclass(eq=False)
class Signal(Located):
    name: str = plain("")
    modulation: str = plain("fm")
    deviation: Q = qty("frequency")
    audio_max: Q = qty("frequency")
    path: str = plain(None)
    service: str = plain(None)
    channel_spacing: Q = qty("frequency")
    switches: dict = plain({})  # v2: switch -> position or list of positions it is received in
    upstream: str = plain(None)  # v2: the source bandwidth setting it is received with
    note: str = plain(None)

    def positions_of(self, switch: str) -> list:
        chosen = self.switches.get(switch) if isinstance(self.switches, dict) else None
        if chosen is None:
            return []
        return [str(p) for p in chosen] if isinstance(chosen, list) else [str(chosen)]


@dataclass(eq=False)
class Preselector(Located):
    center: Q = qty("frequency")
    bandwidth: Q = qty("frequency")
    bandwidth_at: Q = qty("gain")
    response: str = plain(None)


@dataclass(eq=False)
class Source(Located):
    kind: str = plain("")
    frequency: Q = qty("frequency")
    impedance: Q = qty("resistance")
    level_min: Q = qty("level")
    level_max: Q = qty("level")
    bandwidth: Q = qty("frequency")
    drift: Q = qty("frequency")
    preselector: Preselector = sub(Preselector)
    bandwidth_at: Q = qty("gain")
    response: str = plain(None)
    stopband: Q = qty("frequency")
    stopband_at: Q = qty("gain")
    shape_factor: float = plain(None)
    bandwidth_settings: dict = plain({})  # v2: setting name -> Q (frequency), filled by the loader
    output_impedance: Q = qty("resistance")  # v2: the same as impedance
    net: str = plain(None)  # v2: the net the source's signal enters the build on (its connector)


# ---- supply and rails ------------------------------------------------------------------

@dataclass(eq=False)
class Mains(Located):
    voltage: Q = qty("voltage")
    frequency: Q = qty("frequency")
    line_net: str = plain(None)
    neutral_net: str = plain(None)
    earth: str = plain(None)
    enclosure: str = plain(None)
    transformer: str = plain(None)
    primary_fuse: str = plain(None)
    switch: str = plain(None)


@dataclass(eq=False)
class Battery(Located):
    chemistry: str = plain("")
    cells: int = plain(None)
    capacity: Q = qty("charge")
    capacity_at: Q = qty("current")
    internal_resistance: Q = qty("resistance")
    end_voltage: Q = qty("voltage")
    note: str = plain(None)


@dataclass(eq=False)
class Supply(Located):
    kind: str = plain("")
    voltage: Q = qty("voltage")
    rail: str = plain(None)
    max_current: Q = qty("current")
    fuse: str = plain(None)
    series_resistor: str = plain(None)
    reverse_protection: str = plain(None)
    wire_gauge: int = plain(None)
    source_resistance: Q = qty("resistance")
    mains: Mains = sub(Mains)
    battery: Battery = sub(Battery)
    note: str = plain(None)


@dataclass(eq=False)
class Rail(Located):
    name: str = plain("")
    voltage: Q = qty("voltage")
    source: str = plain("supply", key="from")
    note: str = plain(None)

    @property
    def is_ground(self) -> bool:
        return self.voltage is not None and self.voltage.si == 0.0


@dataclass(eq=False)
class NodeInfo(Located):
    name: str = plain("")
    dc: Q = qty("voltage")
    note: str = plain(None)


# ---- device profiles and devices -------------------------------------------------------

@dataclass(eq=False)
class Pin(Located):
    name: str = plain("")
    role: str = plain("other")
    dc: object = plain(None)  # "supply" | "half-supply" | "ground" | "none" | Q (voltage)
    bias_through_tank: bool = plain(False)
    threshold_min: Q = qty("voltage")
    threshold_max: Q = qty("voltage")
    v_min: Q = qty("voltage")
    v_max: Q = qty("voltage")
    output_impedance: Q = qty("resistance")
    input_impedance: Q = qty("resistance")
    needs_dc_blocked: bool = plain(False)
    output_low: Q = qty("voltage")  # a switching output's levels (squelch hysteresis)
    output_high: Q = qty("voltage")
    note: str = plain(None)


@dataclass(eq=False)
class Profile(Located):
    name: str = plain("")
    cls: str = plain("other", key="class")
    typical: bool = plain(False)
    builtin: bool = plain(False)
    description: str = plain("")
    supply_min: Q = qty("voltage")
    supply_max: Q = qty("voltage")
    quiescent_current: Q = qty("current")
    input_impedance: Q = qty("resistance")
    max_input: Q = qty("level")
    max_gain_ahead: Q = qty("gain")
    theta_ja: Q = qty("thermal_resistance")
    theta_jc: Q = qty("thermal_resistance")
    tj_max: Q = qty("temperature")
    output_topology: str = plain(None)
    output_network: str = plain(None)
    output_voltage: Q = qty("voltage")
    dropout: Q = qty("voltage")
    saturation: Q = qty("voltage")
    rated_output: Q = qty("power")
    pins: dict = named(Pin)
    source: str = plain(None)


@dataclass(eq=False)
class HeatSink(Located):
    theta_sa: Q = qty("thermal_resistance")
    theta_cs: Q = qty("thermal_resistance")


@dataclass(eq=False)
class Device(Located):
    name: str = plain("")  # the reference designator
    profile_name: str = plain("", key="profile")
    rail: str = plain(None)
    output_rail: str = plain(None)
    negative_rail: str = plain(None)
    theta_ja: Q = qty("thermal_resistance")
    heat_sink: HeatSink = sub(HeatSink)
    load_current: Q = qty("current")
    note: str = plain(None)
    # resolved by the loader
    profile: Profile | None = field(default=None, repr=False, metadata={"derived": True})

    def pin(self, name: str) -> Pin | None:
        return self.profile.pins.get(name) if self.profile else None


# ---- parts -----------------------------------------------------------------------------

VALUE_DIMENSION = {"resistor": "resistance", "potentiometer": "resistance", "capacitor": "capacitance",
                   "inductor": "inductance", "speaker": "resistance"}
POLARIZED_DIELECTRICS = ("electrolytic", "tantalum")


@dataclass(eq=False)
class Adjust(Located):
    min: Q | None = None
    max: Q | None = None


@dataclass(eq=False)
class Core(Located):
    size: Q = qty("length")
    material: str = plain("")
    al: Q = qty("inductance_factor")


@dataclass(eq=False)
class Pole(Located):
    name: str = plain("")
    common: str = plain(None)
    throws: dict = plain({})  # position -> net


@dataclass(eq=False)
class Part(Located):
    name: str = plain("")  # the reference designator
    kind: str = plain("")
    value: Q | None = None  # dimension depends on kind (VALUE_DIMENSION)
    ends: list = plain([])
    positive: str = plain(None)
    terminals: dict = plain({})  # v2: terminal name -> net; the loader fills it for every part
    wiper: str = plain(None)  # v2: a potentiometer's wiper net
    positions: list = plain([])  # v2: a selector switch's positions
    poles: dict = named(Pole)  # v2: a selector switch's poles
    in_circuit: dict = plain({})  # v2: switch -> position(s) in which the part is in circuit
    combined_from: tuple = field(default=(), metadata={"derived": True})  # parts a stand-in stands for
    dielectric: str = plain(None)
    voltage_rating: Q = qty("voltage")
    power_rating: Q = qty("power")
    current_rating: Q = qty("current")
    tolerance: Q = qty("fraction")
    ac_peak: Q = qty("voltage")
    fusible: bool = plain(False)
    speed: str = plain(None)
    frequency: Q = qty("frequency")
    overtone: int = plain(1)
    load_capacitance: Q = qty("capacitance")
    motional_capacitance: Q = qty("capacitance")
    shunt_capacitance: Q = qty("capacitance")
    adjust: Adjust | None = None  # dimension of min/max follows the part's value
    q: float = plain(None)
    turns: int = plain(None)
    core: Core = sub(Core)
    center: Q = qty("frequency")
    bandwidth: Q = qty("frequency")
    bandwidth_at: Q = qty("gain")
    response: str = plain(None)
    stopband: Q = qty("frequency")
    stopband_at: Q = qty("gain")
    shape_factor: float = plain(None)
    impedance: Q = qty("resistance")
    primary: list = plain([])
    secondary: list = plain([])
    rating: Q = qty("apparent_power")
    primary_voltage: Q = qty("voltage")
    secondary_voltage: Q = qty("voltage")
    forward_voltage: Q = qty("voltage")
    melting_i2t: Q = qty("i2t")
    note: str = plain(None)

    @property
    def polarized(self) -> bool:
        return self.kind == "capacitor" and self.dielectric in POLARIZED_DIELECTRICS

    @property
    def selector(self) -> bool:
        """A switch with poles and positions (v2): it selects what is in circuit."""
        return self.kind == "switch" and bool(self.poles)

    def other_end(self, net: str) -> str | None:
        if len(self.ends) == 2 and net in self.ends:
            return self.ends[1] if self.ends[0] == net else self.ends[0]
        return None


# ---- the signal chain ------------------------------------------------------------------

@dataclass(eq=False)
class Oscillator(Located):
    crystal: str = plain(None)
    frequency: Q = qty("frequency")
    injection: str = plain("low")
    multiplier: int = plain(1)
    mode: str = plain(None)
    load_caps: list = plain([])
    stray: Q = qty("capacitance")
    drift: Q = qty("frequency")


@dataclass(eq=False)
class IfPath(Located):
    name: str = plain("")
    filter: str = plain(None)
    center: Q = qty("frequency")
    bandwidth: Q = qty("frequency")
    bandwidth_at: Q = qty("gain")
    response: str = plain(None)
    stopband: Q = qty("frequency")
    stopband_at: Q = qty("gain")
    shape_factor: float = plain(None)
    bypass: str = plain(None)  # v2: the part that makes a path with no filter
    in_circuit: dict = plain({})  # v2: switch -> position(s) in which the path carries the signal
    note: str = plain(None)


@dataclass(eq=False)
class Tank(Located):
    inductor: str = plain(None)
    capacitor: str = plain(None)
    damping: str = plain(None)  # v2 may list several: the loader keeps them in `choices`
    choices: dict = field(default_factory=dict, repr=False, metadata={"derived": True})
    extra_capacitance: Q = qty("capacitance")


@dataclass(eq=False)
class OutputNetwork(Located):
    resistor: str = plain(None)
    capacitor: str = plain(None)


@dataclass(eq=False)
class Stage(Located):
    kind: str = plain("", key="stage")
    index: int = field(default=0, metadata={"derived": True})  # position in the chain
    name: str = plain(None)
    device: str = plain(None)
    parts: list = plain([])
    topology: str = plain(None)
    load_impedance: Q = qty("resistance")  # v1 only: works_into (input-match) or load_resistance (audio-amp)
    works_into: Q = qty("resistance")
    load_resistance: Q = qty("resistance")
    gain: Q = qty("gain")
    oscillator: Oscillator = sub(Oscillator)
    input_frequency: Q = qty("frequency")
    if_frequency: Q = qty("frequency")
    paths: dict = named(IfPath)
    tank: Tank = sub(Tank)
    resistor: str = plain(None)
    capacitor: str = plain(None)
    time_constant: Q = qty("time")
    corner: Q = qty("frequency")
    load: str = plain(None)
    coupling: str = plain(None)
    output_network: OutputNetwork = sub(OutputNetwork)
    input_bypass: str = plain(None)
    control: str = plain(None)  # squelch: the threshold pot
    pin: str = plain(None)  # squelch: the device pin it sets
    series: str = plain(None)
    shunt: str = plain(None)
    hysteresis: str = plain(None)
    note: str = plain(None)
    choices: dict = field(default_factory=dict, repr=False, metadata={"derived": True})  # field -> [refs]
    # in one configuration's view: capacitors from the RC node to ground that the stage does not
    # list but that are in circuit there, counted with the listed ones: ((ref, node, through), ...)
    unlisted: tuple = field(default=(), repr=False, metadata={"derived": True})

    @property
    def label(self) -> str:
        return self.name or self.kind


@dataclass(eq=False)
class Tap(Located):
    name: str = plain("")
    after: str = plain(None)
    net: str = plain(None)
    series: str = plain(None)
    coupling: str = plain(None)
    load: Q = qty("resistance")
    needs_dc_blocked: bool = plain(False)
    note: str = plain(None)


# ---- the whole build -------------------------------------------------------------------

@dataclass(eq=False)
class Build(Located):
    file: str = field(default="", metadata={"derived": True})
    build_spec: int = plain(1)
    build: BuildInfo = sub(BuildInfo)
    signals: list = items(Signal)
    source: Source = sub(Source)
    supply: Supply = sub(Supply)
    rails: dict = named(Rail)
    nodes: dict = named(NodeInfo)
    profiles: dict = named(Profile)
    devices: dict = named(Device)
    parts: dict = named(Part)
    chain: list = items(Stage)
    taps: list = items(Tap)
    parts_files: list = plain([])
    # Stand-ins for switched or listed parts acting together (R5 and R7 in parallel), by ref
    combined: dict = field(default_factory=dict, repr=False, metadata={"derived": True})
    selected: dict = field(default_factory=dict, repr=False, metadata={"derived": True})  # switch -> position
    configuration: object = field(default=None, repr=False, metadata={"derived": True})

    def part(self, ref: str | None) -> Part | None:
        if not ref or not isinstance(ref, str):
            return None
        return self.parts.get(ref) or self.combined.get(ref)

    @property
    def switched(self) -> bool:
        """Selector switches or selectable upstream bandwidths: rules run per signal and position."""
        return any(p.selector for p in self.parts.values()) or bool(
            self.source is not None and self.source.bandwidth_settings)

    def configurations(self) -> list:
        from speccheck.configs import configurations

        return configurations(self)

    def device(self, ref: str | None) -> Device | None:
        return self.devices.get(ref) if ref else None

    def stages(self, kind: str) -> list:
        return [s for s in self.chain if s.kind == kind]

    def stage_of_part(self, ref: str) -> Stage | None:
        """The first chain stage that names the part, for grouping findings by stage."""
        for stage in self.chain:
            named_refs = set(stage.parts) | {stage.resistor, stage.capacitor, stage.load, stage.coupling,
                                             stage.input_bypass}
            if stage.tank:
                named_refs |= {stage.tank.inductor, stage.tank.capacitor, stage.tank.damping}
            if stage.output_network:
                named_refs |= {stage.output_network.resistor, stage.output_network.capacitor}
            if stage.oscillator:
                named_refs |= {stage.oscillator.crystal, *stage.oscillator.load_caps}
            for path in stage.paths.values():
                named_refs |= {path.filter, path.bypass}
            named_refs |= {stage.control, stage.series, stage.shunt, stage.hysteresis}
            for holder in (stage, stage.tank):
                if holder is not None:
                    named_refs |= {r for refs in holder.choices.values() for r in refs}
            if ref in named_refs:
                return stage
        return None

    @cached_property
    def nets(self):
        from speccheck.nets import NetGraph

        return NetGraph(self)
