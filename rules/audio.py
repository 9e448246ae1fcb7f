"""Audio output: stabilising network, coupling-capacitor corner."""
