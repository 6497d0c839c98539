"""A small hand-built Analysis for drawing and export tests, independent of the solvers.

The inviscid part is the exact potential flow round an ellipse (Joukowski mapping; surface speed
q/U = (1 + b/a)|sin eta| / sqrt(sin^2 eta + (b/a)^2 cos^2 eta), Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics), Cp = 1 - q^2.
The boundary-layer arrays are plausible shapes only (theta from Thwaites' integral, H and Cf
invented): these tests check drawing and export, not physics.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.integrate import cumulative_trapezoid

from profilebench.assess.conditions import Conditions
from profilebench.assess.results import (
    Analysis,
    AnalysisStatus,
    CornerResult,
    DragBreakdown,
    FlowEvent,
    Verdict,
)
from profilebench.flow.boundary_layer import Regime
from profilebench.geometry.profile import Profile

A, B, XC, YC = 2.0, 0.6, 2.2, 0.9
N = 160


@dataclass(frozen=True)
class Inviscid:
    x: np.ndarray
    y: np.ndarray
    s: np.ndarray
    ue: np.ndarray
    cp: np.ndarray


@dataclass(frozen=True)
class Surface:
    s: np.ndarray
    ue: np.ndarray
    x: np.ndarray
    y: np.ndarray
    index: np.ndarray


@dataclass(frozen=True)
class BL:
    s: np.ndarray
    theta: np.ndarray
    delta_star: np.ndarray
    H: np.ndarray
    cf: np.ndarray
    regime: tuple
    margin: np.ndarray
    events: tuple
    separation: object


@dataclass(frozen=True)
class SurfaceFlow:
    name: str
    surface: Surface
    bl: BL


@dataclass(frozen=True)
class Flow:
    inviscid: Inviscid
    upper: SurfaceFlow
    lower: SurfaceFlow
    separated: np.ndarray
    success: bool = True
    base_estimate: object = None  # a constant base pressure


def ellipse_speed(eta):
    """Exact surface speed ratio on the ellipse (Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics)."""
    k = B / A
    return (1 + k) * np.abs(np.sin(eta)) / np.sqrt(np.sin(eta) ** 2 + k**2 * np.cos(eta) ** 2)


def _bl(s, ue, s_tr, s_sep, nu=1.5e-5, speed=30.0):
    U = np.maximum(ue, 1e-3) * speed
    integral = cumulative_trapezoid(U**5, s, initial=0.0)
    theta = np.sqrt(0.45 * nu * integral / U**6 + 1e-12)  # Thwaites' integral
    H = np.where(s < s_tr, 2.6, 1.4 + 0.9 * np.clip((s - s_tr) / max(s_sep - s_tr, 1e-9), 0, 1))
    cf = np.where(s < s_tr, 0.002, 0.004) * (1.0 - 0.8 * np.clip((H - 1.4) / 1.0, 0, 1))
    regime = tuple(
        Regime.SEPARATED if si > s_sep else (Regime.LAMINAR if si < s_tr else Regime.TURBULENT)
        for si in s
    )
    cf = np.where(s > s_sep, 0.0, cf)
    return theta, H * theta, H, cf, regime


def fake_analysis(*, events=True, name="fake ellipse", ground=True) -> Analysis:
    eta_nodes = np.linspace(0.0, 2 * np.pi, N, endpoint=False)
    px, py = XC + A * np.cos(eta_nodes), YC + B * np.sin(eta_nodes)
    eta = eta_nodes + np.pi / N  # panel midpoints in the parameter
    x, y = XC + A * np.cos(eta), YC + B * np.sin(eta)
    q = ellipse_speed(eta)
    ue = np.where(np.sin(eta) > 0, -q, q)  # +x free stream, points run counter-clockwise
    seg = np.hypot(np.diff(np.append(x, x[0])), np.diff(np.append(y, y[0])))
    s_out = np.concatenate([[0.0], np.cumsum(seg)[:-1]])
    inv = Inviscid(x, y, s_out, ue, 1.0 - ue**2)
    upper_idx = np.where(np.sin(eta) > 0)[0][::-1]  # nose (eta = pi) to tail over the top
    lower_idx = np.where(np.sin(eta) < 0)[0]
    flows = {}
    separated = np.zeros(N, dtype=bool)
    evs = [FlowEvent("stagnation", "upper", 0.0, XC - A, YC)]
    for name_s, idx, s_tr, frac_sep in (
        ("upper", upper_idx, 0.6, 0.85),
        ("lower", lower_idx, 2.0, 0.95),
    ):
        xs, ys = x[idx], y[idx]
        s = np.concatenate([[0.0], np.cumsum(np.hypot(np.diff(xs), np.diff(ys)))]) + 0.02
        s_sep = frac_sep * s[-1]
        theta, dstar, H, cf, regime = _bl(s, np.abs(ue[idx]), s_tr, s_sep)
        separated[idx[s > s_sep]] = True
        at = lambda sv: (float(np.interp(sv, s, xs)), float(np.interp(sv, s, ys)))
        if name_s == "upper":
            kinds = [
                ("transition", s_tr),
                ("bubble_separation", 0.5 * (s_tr + s_sep)),
                ("turbulent_separation", s_sep),
            ]
        else:
            kinds = [
                ("laminar_separation", 1.0),
                ("reattachment", 1.4),
                ("transition", s_tr),
                ("edge_separation", s_sep),
            ]
        surface_events = tuple(FlowEvent(k, name_s, sv, *at(sv)) for k, sv in kinds)
        evs += surface_events
        bl = BL(
            s,
            theta,
            dstar,
            H,
            cf,
            regime,
            np.clip(2.4 - H, 0, 1),
            surface_events,
            surface_events[-1],
        )
        flows[name_s] = SurfaceFlow(name_s, Surface(s, np.abs(ue[idx]), xs, ys, idx), bl)
    flow = Flow(inv, flows["upper"], flows["lower"], separated)
    profile = Profile.from_points(np.column_stack([px, py]), smooth=[True] * N, name=name)
    cond = Conditions(speed=30.0, ground=ground, frontal_area=2.0)
    corners = (
        CornerResult(
            0,
            "nose",
            XC - A,
            YC,
            0.5,
            90.0,
            True,
            1.2,
            "frontal height h",
            0.5 / 1.2,
            "upper",
            0.0,
            1.0,
            Verdict.ATTACHED,
            0.4,
            "",
            "square sections",
            0.17,
            "at or above critical",
            "",
            0.0,
        ),
        CornerResult(
            1,
            "tail top",
            XC + A * 0.7,
            YC + B * 0.7,
            0.05,
            45.0,
            True,
            1.2,
            "frontal height h",
            0.05 / 1.2,
            "upper",
            2.0,
            3.0,
            Verdict.TURBULENT_SEPARATION,
            0.0,
            "",
            "square sections",
            0.17,
            "below critical",
            "",
            0.031,
        ),
        CornerResult(
            2,
            "tail low",
            XC + A * 0.7,
            YC - B * 0.7,
            0.0,
            45.0,
            True,
            1.2,
            "frontal height h",
            0.0,
            "lower",
            2.0,
            3.0,
            Verdict.EDGE_SEPARATION,
            0.0,
            "",
            "square sections",
            0.17,
            "below critical",
            "",
            0.052,
        ),
    )
    drag = DragBreakdown(
        cd_friction=0.0123,
        cd_pressure=0.0456,
        cd_base=0.1789,
        cd_corners=0.083,
        cd=0.0123 + 0.0456 + 0.1789 + 0.083,
        cl=-0.0712,
        reference_height=1.2,
        reference_area=2.0,
        cda=2.0 * 0.3198,
        force=0.5 * 1.225 * 30**2 * 2.0 * 0.3198,
        power=0.5 * 1.225 * 30**3 * 2.0 * 0.3198,
        base_pressure=-0.25,
        notes=("fake breakdown for drawing tests",),
    )
    return Analysis(
        AnalysisStatus.SUCCESS,
        "converged",
        profile,
        cond,
        flow=flow,
        corners=corners,
        drag=drag,
        events=tuple(evs) if events else (),
        reynolds=8.2e6,
        model_reynolds=1.1e6,
    )
