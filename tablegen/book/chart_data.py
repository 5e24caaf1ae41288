"""The chart model's data: what a T-s or h-s chart draws, as finished numbers.

``chart_model.build_chart`` fills these; the renderers (``chart_pdf``, ``chart_png``,
through ``chart_compose``) only read them. Pure data: no thermodynamics, no drawing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True, slots=True)
class Axis:
    label: str
    lo: float
    hi: float
    major: tuple          # tick positions (chart units)
    minor: tuple
    labels: tuple         # text of each major tick


@dataclass(frozen=True, slots=True)
class SideScale:
    """A non-linear scale on the right axis: tick positions in y units."""

    label: str
    major: tuple
    minor: tuple
    labels: tuple


@dataclass(frozen=True, slots=True)
class Label:
    text: str
    x: float              # centre, chart units
    y: float
    du: float             # direction of the line at the label, normalised plot units
    dv: float
    size: float           # pt


@dataclass(frozen=True, slots=True)
class Line:
    family: str           # isobar, isochore, isotherm, process, isentropic, aux
    x: np.ndarray         # chart units
    y: np.ndarray
    style: str            # key of chart_layout.STYLES
    label: Label | None = None
    value_SI: float = math.nan    # P (Pa), v (m³/kg) or T (K) of the line
    T_K: np.ndarray | None = None
    P_Pa: np.ndarray | None = None


@dataclass(frozen=True, slots=True)
class StatePoint:
    name: str             # "1", "2s", "A2", ...
    T_K: float
    P_Pa: float
    h: float              # J/kg
    s: float              # J/(kg K)
    x: float
    y: float
    isentropic: bool
    label: Label | None = None


@dataclass(frozen=True, slots=True)
class Arrow:
    x: float
    y: float
    du: float
    dv: float


@dataclass(frozen=True, slots=True)
class PanelBlock:
    kind: str             # heading, text, key, table
    content: tuple        # text lines; key: (style, text) pairs; table: rows of cells
    size: float = 7.0


@dataclass(frozen=True, slots=True)
class ChartModel:
    kind: str
    paper: str
    units: str
    title: str
    subtitle: str
    x_axis: Axis
    y_axis: Axis
    side: SideScale | None
    lines: tuple
    points: tuple
    arrows: tuple
    panel: tuple
    footer: str
    fingerprint: str
    notes: tuple = ()
    extra: dict = field(default_factory=dict)
