"""Until speccheck/formulas/resonators.py and audio.py land (issue 8), the same functions from
their present homes. Removed once they land."""

from __future__ import annotations

try:  # pragma: no cover - depends on which layout is present
    from speccheck.formulas import audio, matching, resonators
except ImportError:  # pragma: no cover
    from types import SimpleNamespace

    from speccheck import rf as matching  # type: ignore[no-redef]
    from speccheck import rf as resonators  # type: ignore[no-redef]

    audio = SimpleNamespace(rc_corner=lambda ohms, farads: rf_corner(ohms * farads),  # type: ignore[assignment]
                            corner_from_tau=resonators.rc_corner, rc_time_constant=resonators.rc_time_constant)

    def rf_corner(tau: float) -> float:
        return resonators.rc_corner(tau)

__all__ = ["audio", "matching", "resonators"]
