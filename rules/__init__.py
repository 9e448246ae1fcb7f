"""Rule families. Each module (or package) here is one family; the engine imports the ones listed,
in this order, and runs their rules in it. input and review are reported by the loader and the
waiver pass, not run on the model."""

FAMILIES = ["input", "review", "wiring", "freqplan", "rfpath", "power", "audio", "mains", "squelch", "tap",
            "battery", "connect"]
