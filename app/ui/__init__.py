"""The desktop window: a Qt canvas that views the sketch and writes the solution back onto it.

Only this package imports Qt (PySide6).
"""
