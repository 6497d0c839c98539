"""Profiles shared by the geometry tests."""

from profilebench.geometry import Node, Profile


def make_car_like(r_nose=0.1, r_roof=0.15, r_tail=0.05, r_bonnet=0.08):
    """Invented profile: nose (line-spline corner), bonnet/windscreen/roof spline, sharp tail."""
    return Profile(
        (
            Node(0.0, 0.3, r_nose, label="nose"),
            Node(0.8, 0.8, smooth=True),
            Node(1.6, 1.0, r_bonnet, label="bonnet"),  # spline on both sides
            Node(2.4, 1.35, smooth=True),
            Node(3.5, 1.35, r_roof, label="roof rear"),  # spline in, line out
            Node(4.0, 0.9, 0.0, label="tail"),
            Node(
                4.0, 0.3, 0.05 if r_tail is None else r_tail, label="rear bottom"
            ),  # line in, spline out
            Node(2.0, 0.2, smooth=True),
        )
    )
