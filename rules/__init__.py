"""Rule families. Each module here is one family; the engine imports the ones listed."""

FAMILIES = ["wiring", "freqplan", "rfpath", "power", "audio", "mains"]
