"""The text `speccheck profile` prints: a device profile's values and pins, typical ones marked."""

from __future__ import annotations

import dataclasses

from speccheck import model

VALUE_FIELDS = [f.name for f in dataclasses.fields(model.Profile) if f.metadata.get("dim")]
PIN_VALUES = [f.name for f in dataclasses.fields(model.Pin) if f.metadata.get("dim")]


def _bias(pin) -> str:
    if pin.dc is None:
        return "not stated"
    if hasattr(pin.dc, "text"):
        return pin.dc.text
    return {
        "supply": "at its supply",
        "half-supply": "at half its supply",
        "ground": "at ground",
        "none": "no DC bias",
    }.get(pin.dc, str(pin.dc))


def where_from(prof) -> str:
    if prof.builtin:
        return "built in"
    loc = prof.loc
    return f"declared in {loc.file}:{loc.line}" if loc.file else "declared"


def lines(prof) -> list[str]:
    mark = "  (typical)" if prof.typical else ""
    out = [f"profile {prof.name}: {prof.cls} ({where_from(prof)})"]
    if prof.description:
        out.append(f"  {' '.join(prof.description.split())}")
    out.append(
        "  values are TYPICAL for the class, not a datasheet's: declare your own profile before you trust "
        "a result that depends on them"
        if prof.typical
        else "  values as declared (datasheet)"
    )
    if prof.source:
        out.append(f"  source: {prof.source}")
    shown = [(name, getattr(prof, name)) for name in VALUE_FIELDS if getattr(prof, name) is not None]
    shown += [
        (name, getattr(prof, name)) for name in ("output_topology", "output_network") if getattr(prof, name)
    ]
    if shown:
        out.append("  values:")
        width = max(len(n) for n, _ in shown)
        out += [f"    {n:<{width}}  {v}{mark}" for n, v in shown]
    if prof.pins:
        out.append("  pins (role, DC bias, more):")
        width = max(len(n) for n in prof.pins)
        for name, pin in prof.pins.items():
            more = [f"{k} {getattr(pin, k)}{mark}" for k in PIN_VALUES if getattr(pin, k) is not None]
            if pin.bias_through_tank:
                more.append("biased through the external tank coil")
            if pin.needs_dc_blocked:
                more.append("must not be fed DC")
            if pin.note:
                more.append(pin.note)
            tail = f"; {'; '.join(more)}" if more else ""
            out.append(f"    {name:<{width}}  {pin.role}, {_bias(pin)}{tail}")
    return out


def listing(profiles: dict) -> list[str]:
    width = max((len(n) for n in profiles), default=0)
    return [
        f"{name:<{width}}  {p.cls:24} {'typical' if p.typical else 'datasheet'}  {where_from(p)}"
        for name, p in sorted(profiles.items())
    ]


def show(name: str | None, build_file: str | None) -> tuple[list[str], str]:
    """(lines to print, trouble): a profile by name, or the list; from a build's profiles when given."""
    import difflib

    from speccheck import loader

    profiles = dict(loader.builtin_profiles())
    if build_file:
        loaded = loader.load(build_file)
        if loaded.build is None or not loaded.can_check:
            said = [
                f"{f.location.file}:{f.location.line}:{f.location.col}: {f.level} {f.rule} {f.message}"
                for f in loaded.findings[:5]
            ]
            return said, f"{build_file}: cannot read its profiles"
        profiles = loaded.build.profiles
    if not name:
        return listing(profiles), ""
    if name not in profiles:
        close = difflib.get_close_matches(name, list(profiles), n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        return [], f"no profile '{name}'{hint} (`speccheck profile` lists them)"
    return lines(profiles[name]), ""
