"""Checking a hand analysis: branches, KVL/KCL equations and a checker for typed equations (Qt-free)."""
