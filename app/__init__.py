"""Loopwright application: sketch model, command line and desktop window."""
import os

# One BLAS thread, set before numpy loads. The window solves sketch-sized systems (dense up to a
# few hundred unknowns, sparse LU above) on every edit; a second BLAS thread does not speed such
# small solves, and when another program holds a core it makes them slower (measured here on a
# 200-part sketch with one core busy: 2.7-3.2 ms per solve, 1.9 ms with one thread).
# A person's own setting of the variable is kept.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
