"""Mains and hazardous voltage: cautions and the checks behind them."""
