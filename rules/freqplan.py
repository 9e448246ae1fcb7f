"""Frequency plan: conversion arithmetic, image, necessary bandwidth, spurs, tank, crystal, audio corner."""
