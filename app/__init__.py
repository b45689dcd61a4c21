"""Loopwright application: sketch model, command line and desktop window."""
