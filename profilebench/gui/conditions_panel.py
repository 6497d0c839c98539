"""The flow-conditions panel: entry fields with an error line next to each, no clamping.

Every accepted change emits ``changed(Conditions, description)``; the window turns it into an
undoable edit. A refused entry keeps the previous conditions and shows why under the field.
"""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QFormLayout,
    QLabel,
    QLineEdit,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor.fields import (
    parse_length_mm,
    parse_number,
    parse_optional,
    parse_speed_kmh,
)
from profilebench.errors import ProfileBenchError

__all__ = ["ConditionsPanel"]

ERROR_STYLE = "color: #b03000;"

#: the base-pressure choices: (Conditions.base_model, what the panel shows)
BASE_MODEL_ITEMS = (
    ("constant", "the Base Cp above"),
    ("body", "boundary layer at separation, 3D base"),
    ("section", "boundary layer at separation, 2D base"),
)


def _fmt(value, scale=1.0, digits=6):
    return "" if value is None else f"{value * scale:.{digits}g}"


class ConditionsPanel(QWidget):
    """Speed (km/h), air, ground, transition, separation threshold, reference area, scale test."""

    changed = Signal(object, str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self._conditions = None
        self._updating = False
        self.fields: dict[str, QLineEdit] = {}
        self.errors: dict[str, QLabel] = {}
        layout = QVBoxLayout(self)
        form = QFormLayout()
        layout.addLayout(form)
        self._form = form

        def entry(key, label, tip):
            edit = QLineEdit()
            edit.setToolTip(tip)
            edit.editingFinished.connect(lambda k=key: self._commit(k))
            err = QLabel("")
            err.setStyleSheet(ERROR_STYLE)
            err.setWordWrap(True)
            err.hide()
            form.addRow(label, edit)
            form.addRow("", err)
            self.fields[key] = edit
            self.errors[key] = err

        entry("speed", "Speed (km/h)", "vehicle speed through still air")
        self.air_mode = QComboBox()
        self.air_mode.addItems(["standard atmosphere (ISO 2533)", "given density and viscosity"])
        self.air_mode.currentIndexChanged.connect(self._air_mode_changed)
        form.addRow("Air", self.air_mode)
        entry("altitude", "Altitude (m)", "ISO 2533 geopotential altitude")
        entry("temperature_offset", "Temperature offset (K)", "added to the ISO 2533 temperature")
        entry("density", "Density (kg/m³)", "used with the kinematic viscosity")
        entry("kinematic_viscosity", "Kinematic viscosity (m²/s)", "e.g. 1.46e-5")
        self.ground = QCheckBox("moving-belt ground at y = 0")
        self.ground.toggled.connect(self._ground_toggled)
        form.addRow("Ground", self.ground)
        self.side_relief = QCheckBox("underbody gap leaks sideways (with a width)")
        self.side_relief.setToolTip(
            "underbody side relief: the gap under the body as a channel of the vehicle's width "
            "leaking through its sides; off, or without a width, the 2D section's underbody"
        )
        self.side_relief.toggled.connect(self._side_relief_toggled)
        form.addRow("Side relief", self.side_relief)
        self.transition_mode = QComboBox()
        self.transition_mode.addItems(["free (criterion)", "fully turbulent", "forced at position"])
        self.transition_mode.currentIndexChanged.connect(lambda _: self._commit("transition"))
        form.addRow("Transition", self.transition_mode)
        entry("transition", "Forced at (mm of arc)", "arc length from the stagnation point")
        entry("h_separation", "Separation at H =", "turbulent separation threshold, 1.8 to 2.8")
        entry("frontal_area", "Frontal area (m²)", "leave empty to use width x height")
        entry("width", "Width (mm)", "used when no frontal area is given")
        entry("model_scale", "Model scale", "model length / full-scale length, 0 < scale <= 1")
        entry("tunnel_speed", "Tunnel speed (km/h)", "scale test speed; empty for none")
        entry("base_pressure", "Base Cp", "Cp in separated regions, -1.5 to 0")
        self.base_model = QComboBox()
        self.base_model.addItems([label for _, label in BASE_MODEL_ITEMS])
        self.base_model.setToolTip(
            "where the base pressure comes from: the Base Cp above, or the boundary layer at the "
            "two final separation points through Hoerner's blunt-base correlation (3D base: a "
            "vehicle's; 2D base: a section spanning a tunnel). From the layer, the Base Cp above "
            "is only a first guess, and an outline outside the correlation's range fails with a "
            "message"
        )
        self.base_model.currentIndexChanged.connect(self._base_model_changed)
        form.addRow("Base Cp from", self.base_model)
        entry("panels", "Panels", "panel count, 40 to 2000")
        layout.addStretch(1)

    # ---------------------------------------------------------------- model -> widgets
    def set_conditions(self, c):
        self._conditions = c
        self._updating = True
        try:
            f = self.fields
            f["speed"].setText(_fmt(c.speed, 3.6, 5))
            f["altitude"].setText(_fmt(c.altitude))
            f["temperature_offset"].setText(_fmt(c.temperature_offset))
            f["density"].setText(_fmt(c.density))
            f["kinematic_viscosity"].setText(_fmt(c.kinematic_viscosity))
            given = c.density is not None
            self.air_mode.setCurrentIndex(1 if given else 0)
            self._show_air(given)
            self.ground.setChecked(bool(c.ground))
            self.side_relief.setChecked(bool(c.side_relief))
            if isinstance(c.transition, str):
                self.transition_mode.setCurrentIndex(0 if c.transition == "free" else 1)
                f["transition"].setText("")
            else:
                self.transition_mode.setCurrentIndex(2)
                f["transition"].setText(_fmt(c.transition, 1000.0))
            f["transition"].setEnabled(self.transition_mode.currentIndex() == 2)
            f["h_separation"].setText(_fmt(c.h_separation))
            f["frontal_area"].setText(_fmt(c.frontal_area))
            f["width"].setText(_fmt(c.width, 1000.0))
            f["model_scale"].setText(_fmt(c.model_scale))
            f["tunnel_speed"].setText(_fmt(c.tunnel_speed, 3.6, 5))
            f["base_pressure"].setText(_fmt(c.base_pressure))
            models = [m for m, _ in BASE_MODEL_ITEMS]
            self.base_model.setCurrentIndex(models.index(c.base_model))
            f["panels"].setText(str(c.panels))
            for err in self.errors.values():
                err.hide()
        finally:
            self._updating = False

    def _show_air(self, given: bool):
        for key in ("altitude", "temperature_offset"):
            self.fields[key].setEnabled(True)
        for key in ("density", "kinematic_viscosity"):
            self.fields[key].setEnabled(given)

    # ---------------------------------------------------------------- widgets -> model
    def _parse(self, key):
        text = self.fields[key].text()
        if key == "speed":
            return {"speed": parse_speed_kmh(text, "speed")}
        if key in (
            "altitude",
            "temperature_offset",
            "h_separation",
            "base_pressure",
            "model_scale",
        ):
            return {key: parse_number(text, key.replace("_", " "))}
        if key in ("density", "kinematic_viscosity"):
            other = "kinematic_viscosity" if key == "density" else "density"
            value = parse_number(text, key.replace("_", " "))
            other_text = self.fields[other].text()
            changes = {key: value}
            if other_text.strip():
                changes[other] = parse_number(other_text, other.replace("_", " "))
            return changes
        if key == "frontal_area":
            return {"frontal_area": parse_optional(text, parse_number, "frontal area", "m²")}
        if key == "width":
            return {"width": parse_optional(text, parse_length_mm, "width")}
        if key == "tunnel_speed":
            return {"tunnel_speed": parse_optional(text, parse_speed_kmh, "tunnel speed")}
        if key == "panels":
            value = parse_number(text, "panels")
            if value != int(value):
                from profilebench.errors import InputError

                raise InputError(
                    f"panels = {value:g} is not a whole number; type a count such as 250"
                )
            return {"panels": int(value)}
        if key == "transition":
            mode = self.transition_mode.currentIndex()
            self.fields["transition"].setEnabled(mode == 2)
            if mode == 0:
                return {"transition": "free"}
            if mode == 1:
                return {"transition": "turbulent"}
            if not text.strip():
                raise ProfileBenchError(
                    "forced transition needs a position; type the arc length in mm"
                )
            return {"transition": parse_length_mm(text, "forced transition position")}
        raise KeyError(key)

    def _commit(self, key):
        if self._updating or self._conditions is None:
            return
        err = self.errors[key]
        try:
            changes = self._parse(key)
            new = self._conditions.replace(**changes)
        except ProfileBenchError as exc:
            err.setText(str(exc))
            err.show()
            return
        err.hide()
        if new != self._conditions:
            self._conditions = new
            self.changed.emit(new, f"Change {key.replace('_', ' ')}")

    def _air_mode_changed(self, index):
        if self._updating or self._conditions is None:
            return
        given = index == 1
        self._show_air(given)
        if given:
            air = self._conditions.air
            self._updating = True
            self.fields["density"].setText(f"{air.density:.6g}")
            self.fields["kinematic_viscosity"].setText(f"{air.kinematic_viscosity:.6g}")
            self._updating = False
            self._commit("density")
        else:
            new = self._conditions.replace(density=None, kinematic_viscosity=None)
            if new != self._conditions:
                self._conditions = new
                self.changed.emit(new, "Use standard atmosphere")

    def _ground_toggled(self, on):
        self._switched("ground", "Ground", on)

    def _side_relief_toggled(self, on):
        self._switched("side_relief", "Side relief", on)

    def _base_model_changed(self, index):
        if self._updating or self._conditions is None:
            return
        model, label = BASE_MODEL_ITEMS[index]
        new = self._conditions.replace(base_model=model)
        if new != self._conditions:
            self._conditions = new
            self.changed.emit(new, f"Base Cp from {label}")

    def _switched(self, field, words, on):
        """A check box's condition changed by the user (not while the panel is being filled)."""
        if self._updating or self._conditions is None:
            return
        new = self._conditions.replace(**{field: bool(on)})
        self._conditions = new
        self.changed.emit(new, f"{words} {'on' if on else 'off'}")

    def set_value(self, key: str, text: str) -> None:
        """Type ``text`` into field ``key`` and commit it, as the user would (for scripts/tests)."""
        self.fields[key].setText(text)
        self._commit(key)
