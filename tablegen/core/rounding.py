"""Round steps: the 1-2-2.5-5 × 10^n sequence that grids, axes and tick marks use.

Core layer: plain arithmetic, no thermodynamics, no numpy. Each caller used to carry its
own copy; they differed only in which end of the sequence they walk from, so this module
offers the walks (down from a span, up to a raw step, down from the decade above a span)
over one mantissa table.
"""

from __future__ import annotations

import math

#: Mantissas of a round step (2.5 gives quarter steps of ten, common practice on scales);
#: 10 closes the decade when walking up.
MANTISSAS = (1, 2, 2.5, 5, 10)


def decade(x: float) -> float:
    """10^floor(log10 x), the decade a positive ``x`` lies in."""
    return 10.0 ** math.floor(math.log10(x))


def round_step_up(raw: float, fits=None) -> tuple:
    """The smallest round step m × decade(raw) that ``fits(step)`` (default: step >= raw).

    Returns ``(m, decade)`` so that a caller can tie other choices (minor ticks) to the
    mantissa; m is 10 when no smaller mantissa fits.
    """
    mag = decade(raw)
    fits = fits or (lambda step: raw <= step)
    for m in MANTISSAS:
        if fits(m * mag):
            return m, mag
    return 10, mag


def round_steps_down(span: float, smallest_exponent: int = -2) -> list:
    """Every round step m × 10^e <= ``span`` with e >= ``smallest_exponent``, largest first."""
    out = []
    for e in range(smallest_exponent, int(math.floor(math.log10(max(span, 10.0 ** smallest_exponent)))) + 1):
        for m in MANTISSAS[:-1]:
            s = float(m) * 10.0 ** e
            if s <= span:
                out.append(s)
    return sorted(set(out), reverse=True)


def round_steps_from_top(span: float, decades: int = 9) -> list:
    """Round steps 10^ceil(log10 span) × (1, 1/2, 1/4, 1/5) / 10^e for e < ``decades``,
    largest first (the book grid's historical walk: the same sequence as
    :func:`round_steps_down`, computed from the top, which differs in the last bit for
    spans below 1)."""
    out = []
    top = 10 ** math.ceil(math.log10(span))
    for e in range(0, decades):
        for m in (1.0, 0.5, 0.25, 0.2):
            out.append(top * m / 10 ** e)
    return sorted(set(out), reverse=True)
