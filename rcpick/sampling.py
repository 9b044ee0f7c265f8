"""Random draws for the Monte Carlo: seeded streams, band distributions, parts from one lot.

Every random quantity of a simulated unit has its own *stream*, named by the
part slot it belongs to (``R1``, ``C2`` …, or a network element) and the field
(``tol``, ``cold``, ``hot``, ``age``, ``level``). Chunk ``k`` of a stream is
drawn from a generator seeded by (seed, stream, field, k), so

* the same seed gives the same units, whatever else is drawn (a design draws
  only what its parts need: a single resistor with a linear TCR needs two
  numbers per unit, not seventeen);
* every design of a search sees the same units (common random numbers), and a
  network's parts map onto the same streams as a lone R and C.

Band positions lie in [-1, 1]: ``uniform`` is u ↦ 2u − 1; ``normal`` is the
normal distribution with the band at ±3σ, truncated there, drawn by its
inverse CDF (scipy.special.ndtri, imported only when needed).

Parts from one lot (docs/model.md): parts of the same value and model in one
design come from one reel. With lot share ρ, each such part's latent normal
is √ρ·n_lot + √(1 − ρ)·n_unit (so any two of them correlate with ρ) and is
mapped back to the band through the normal CDF, which keeps every part's own
distribution exactly uniform (or truncated normal). ρ = 1 makes them
identical (the lot stream is the first part's own stream, so a pair from one
reel sees exactly the draws of a single part); ρ = 0 makes them independent.

References
----------
NIST/SEMATECH e-Handbook of Statistical Methods §3.2.3 (nested, between-lot
and within-lot variance components).
"""

from __future__ import annotations

import math
import zlib

import numpy as np

DISTRIBUTIONS = ("uniform", "normal")
#: Normal distribution: the band is ±3σ, truncated at the band.
SIGMAS_IN_BAND = 3.0
#: Units simulated at once; bounds working memory.
CHUNK_UNITS = 65536
FIELDS = {"tol": 0, "cold": 1, "hot": 2, "age": 3, "level": 4}
_PHI_MINUS_3 = 0.5 * math.erfc(SIGMAS_IN_BAND / math.sqrt(2.0))  # Φ(−3) = 0.0013499


def _ndtri():
    from scipy.special import ndtri  # heavy: only for the normal distribution or a partial lot share

    return ndtri


def _ndtr():
    from scipy.special import ndtr

    return ndtr


class Sampler:
    """Draws for one Monte Carlo run: a seed, a distribution and a lot share.

    Parameters
    ----------
    seed : int or None
        Same seed, same units. None draws fresh entropy once (all streams share it).
    dist : str
        ``uniform`` or ``normal`` (band at ±3σ, truncated).
    lot_share : float
        Share of a part's deviation common to its lot, 0 … 1.
    """

    def __init__(self, seed: int | None, dist: str = "uniform", lot_share: float = 1.0):
        if dist not in DISTRIBUTIONS:
            raise ValueError(f"dist must be one of {DISTRIBUTIONS}")
        if not 0.0 <= lot_share <= 1.0:
            raise ValueError("lot_share must lie in 0 … 1")
        self.entropy = np.random.SeedSequence(seed).entropy
        self.dist = dist
        self.lot_share = float(lot_share)

    def chunks(self, samples: int):
        """(chunk index, units) for ``samples`` units in chunks of :data:`CHUNK_UNITS`."""
        for k, start in enumerate(range(0, samples, CHUNK_UNITS)):
            yield k, min(CHUNK_UNITS, samples - start)

    def chunk(self, index: int, units: int) -> Chunk:
        return Chunk(self, index, units)


class Chunk:
    """The draws of one chunk of units, made on demand and kept for reuse."""

    def __init__(self, sampler: Sampler, index: int, units: int):
        self.sampler = sampler
        self.index = index
        self.units = units
        self._uniform: dict[tuple[str, str], np.ndarray] = {}
        self._band: dict[tuple[str, str, str | None], np.ndarray] = {}

    def view(self, start: int, stop: int) -> ChunkView:
        """Units ``start:stop`` of this chunk: the same draws, for work in blocks that fit the CPU's cache."""
        return ChunkView(self, start, stop)

    def uniform(self, stream: str, field: str) -> np.ndarray:
        """Uniform numbers in (0, 1) of one stream and field, shape (units,)."""
        key = (stream, field)
        if key not in self._uniform:
            seq = np.random.SeedSequence(
                self.sampler.entropy, spawn_key=(zlib.crc32(stream.encode()), FIELDS[field], self.index)
            )
            u = np.random.Generator(np.random.PCG64(seq)).random(self.units)
            # (0, 1) open: keeps the inverse CDFs finite
            self._uniform[key] = np.clip(u, 2.0**-54, 1.0 - 2.0**-54, out=u)
        return self._uniform[key]

    def band(self, stream: str, field: str, lot: str | None = None) -> np.ndarray:
        """Band positions in [-1, 1], shape (units,).

        ``lot`` names the stream of the lot the part shares (its first part's
        stream); None for a part alone in its lot.
        """
        key = (stream, field, lot)
        if key not in self._band:
            self._band[key] = self._to_band(self._lot_uniform(stream, field, lot))
        return self._band[key]

    def _lot_uniform(self, stream: str, field: str, lot: str | None) -> np.ndarray:
        share = self.sampler.lot_share
        if lot is None:
            return self.uniform(stream, field)
        if share >= 1.0:
            return self.uniform(lot, field)
        unit = self.uniform(stream + "/unit", field)
        if share <= 0.0:
            return unit
        ndtri, ndtr = _ndtri(), _ndtr()
        latent = math.sqrt(share) * ndtri(self.uniform(lot, field)) + math.sqrt(1.0 - share) * ndtri(unit)
        return np.clip(ndtr(latent), 2.0**-54, 1.0 - 2.0**-54)

    def _to_band(self, u: np.ndarray) -> np.ndarray:
        if self.sampler.dist == "uniform":
            return 2.0 * u - 1.0
        p = _PHI_MINUS_3 + u * (1.0 - 2.0 * _PHI_MINUS_3)
        return np.clip(_ndtri()(p) / SIGMAS_IN_BAND, -1.0, 1.0)


class ChunkView:
    """A block of a chunk's units: its draws are slices of the chunk's (so a block changes no number)."""

    def __init__(self, chunk: Chunk, start: int, stop: int):
        self.chunk = chunk
        self.start, self.stop = start, stop
        self.units = stop - start

    def band(self, stream: str, field: str, lot: str | None = None) -> np.ndarray:
        return self.chunk.band(stream, field, lot)[self.start : self.stop]


#: What the spread engine draws from: a whole chunk or a block of one.
Draws = Chunk | ChunkView
