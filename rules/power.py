"""Power and heat: current budget, dissipation and heat sink, supply fuse, reverse polarity."""
