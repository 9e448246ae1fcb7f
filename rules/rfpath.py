"""RF path: input match and gain ahead of a low-intercept IF device."""
