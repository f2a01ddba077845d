"""Building details and the cats at risk."""

from __future__ import annotations

from html import escape
from typing import Any

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QComboBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.code_profile import DEFAULT_PROFILE, PROFILE_IDS, code_profile
from petfall_audit.editing.commands import SetBuildingInfo, SetCatProfile, SetInjuryModel
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import INFO_FIELDS, INJURY_FIELDS
from petfall_audit.editing.history import History
from petfall_audit.gui.adapters import ViewOptions, push_command
from petfall_audit.gui.widgets.field_form import ERROR_STYLE, FieldForm
from petfall_audit.model import CAT_PRESETS, InjuryThresholds
from petfall_audit.present import PRESET_LABELS
from petfall_audit.present.code import code_profile_lead, code_rule_rows, profile_choices

__all__ = ["BuildingPanel"]

def rules_html(profile_id: str) -> str:
    """The rules in force under ``profile_id`` as a readable list (rich text for a label)."""
    profile = code_profile(profile_id)
    items = "".join(
        f"<li><b>{escape(r.topic)}</b>: {escape(r.rule)}<br/>"
        f"<i>{escape(r.reference)}</i> – {escape(r.confidence)}</li>"
        for r in code_rule_rows(profile)
    )
    return f"<p>{escape(code_profile_lead(profile))}</p><ul>{items}</ul>"


class BuildingPanel(QWidget):
    """The building's details form, its code profile (with the rules in force) and the
    cat-profile preset. ``code_profile_picked(units)`` after the user picks a profile, with the
    profile's units (``"metric"`` / ``"imperial"``) for the app to start in."""

    code_profile_picked = Signal(str)

    def __init__(self, doc: Document, history: History, options: ViewOptions,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._doc = doc
        self._history = history
        self.form = FieldForm(INFO_FIELDS, options, self._commit)
        self.form.setObjectName("building_form")
        details = QGroupBox("Building details")
        QVBoxLayout(details).addWidget(self.form)

        self.code = QComboBox()
        self.code.setObjectName("code_profile")
        for pid, name in profile_choices():
            self.code.addItem(name, pid)
        self.code.setToolTip("The jurisdiction whose building code the audit cites; it decides "
                             "the conditions that go with each fix, never the physics")
        self.code.activated.connect(self._on_code_chosen)
        self.code_rules = QLabel()
        self.code_rules.setObjectName("code_rules")
        self.code_rules.setWordWrap(True)
        self.code_rules.setTextFormat(Qt.TextFormat.RichText)
        self.code_rules.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.code_error = QLabel()
        self.code_error.setWordWrap(True)
        self.code_warnings = QLabel()
        self.code_warnings.setObjectName("code_warnings")
        self.code_warnings.setWordWrap(True)
        code_box = QGroupBox("Building code")
        code_layout = QFormLayout(code_box)
        code_layout.addRow("Code profile", self.code)
        code_layout.addRow(self.code_error)
        code_layout.addRow(self.code_warnings)
        code_layout.addRow(self.code_rules)

        self.profile = QComboBox()
        self.profile.setObjectName("cat_profile")
        for key, label in PRESET_LABELS.items():
            self.profile.addItem(label, key)
        self.profile.activated.connect(self._on_profile_chosen)
        #: Why the last change of population was refused (hidden while there is none).
        self.profile_error = QLabel()
        self.profile_error.setObjectName("profile_error")
        self.profile_error.setWordWrap(True)
        self.profile_error.setStyleSheet(ERROR_STYLE)
        self.profile_error.hide()
        cats = QGroupBox("Cats at risk")
        cats_layout = QFormLayout(cats)
        cats_layout.addRow("Population", self.profile)
        cats_layout.addRow(self.profile_error)
        cats_layout.addRow(QLabel("Mass, body drag, chance of relaxing in the fall and righting "
                                  "time are sampled from the chosen population; see the method "
                                  "notes in the audit report."))
        self.injury_form = FieldForm(INJURY_FIELDS, options, self._commit_injury)
        self.injury_form.setObjectName("injury_form")
        injury = QGroupBox("Injury bands")
        injury_layout = QVBoxLayout(injury)
        explain = QLabel("How likely each injury band is for a fall of a given dose (its mean "
                         "deceleration). The defaults are fitted to published veterinary case "
                         "series; change them only with a reason you can state in the audit.")
        explain.setWordWrap(True)
        injury_layout.addWidget(explain)
        injury_layout.addWidget(self.injury_form)
        self.injury_reset = QPushButton("Use the fitted defaults")
        self.injury_reset.setObjectName("injury_reset")
        self.injury_reset.clicked.connect(self._on_injury_reset)
        injury_layout.addWidget(self.injury_reset)
        layout = QVBoxLayout(self)
        layout.addWidget(details)
        layout.addWidget(code_box)
        layout.addWidget(cats)
        layout.addWidget(injury)
        layout.addStretch(1)
        self._disconnects = [doc.on_changed("building", self._on_building_changed),
                             doc.on_changed("openings", self._on_openings_changed),
                             doc.on_changed("profile", self._on_profile_changed)]
        self._on_building_changed("building")
        self._on_profile_changed("profile")

    def detach(self) -> None:
        for disconnect in self._disconnects:
            disconnect()

    def _commit(self, name: str, value: Any) -> str | None:
        return push_command(self._history, SetBuildingInfo({name: value}))

    def _on_building_changed(self, kind: str) -> None:
        info = self._doc.building.info
        self.form.set_values({s.name: getattr(info, s.name) for s in INFO_FIELDS},
                             keep_errors=True)
        pid = info.code_profile if info.code_profile in PROFILE_IDS else DEFAULT_PROFILE
        self.code.setCurrentIndex(self.code.findData(pid))
        self.code_rules.setText(rules_html(pid))
        self._on_openings_changed("openings")

    def _on_openings_changed(self, kind: str) -> None:
        """What the profile finds in this building (an escape window's limiter too narrow)."""
        from petfall_audit.io.survey import code_profile_warnings

        found = code_profile_warnings(self._doc.building)
        self.code_warnings.setText("\n".join(f"! {w.message}" for w in found))
        self.code_warnings.setVisible(bool(found))

    def _on_code_chosen(self, index: int) -> None:
        pid = str(self.code.itemData(index))
        if pid == self._doc.building.info.code_profile:
            return
        profile = code_profile(pid)
        reason = push_command(self._history, SetBuildingInfo(
            {"code_profile": pid}, label=f"Set the code profile to {profile.name}"))
        self.code_error.setText(reason or "")
        if reason is None:
            self.code_profile_picked.emit(profile.units)

    def _commit_injury(self, name: str, value: Any) -> str | None:
        return push_command(self._history, SetInjuryModel({name: value}))

    def _on_injury_reset(self) -> None:
        fitted = InjuryThresholds()
        if self._doc.building.injury != fitted:
            push_command(self._history, SetInjuryModel(
                {n: getattr(fitted, n) for n in ("moderate_g", "serious_g",
                                                  "life_threatening_g", "spread")},
                label="Use the fitted injury bands"))

    def _on_profile_changed(self, kind: str) -> None:
        injury = self._doc.building.injury
        self.injury_form.set_values({s.name: getattr(injury, s.name) for s in INJURY_FIELDS},
                                    keep_errors=True)
        preset = self._doc.building.cat_profile.preset
        i = self.profile.findData(preset)
        if i < 0 and self.profile.findData(None) < 0:
            self.profile.addItem("Custom (from the file)", None)
        self.profile.setCurrentIndex(i if i >= 0 else self.profile.findData(None))

    def _on_profile_chosen(self, index: int) -> None:
        key = self.profile.itemData(index)
        if key is None or key == self._doc.building.cat_profile.preset:
            return
        reason = push_command(self._history, SetCatProfile(CAT_PRESETS[key]))
        self.profile_error.setText(f"! Not changed: {reason}" if reason else "")
        self.profile_error.setVisible(reason is not None)
        if reason is not None:  # the box shows the population still in force
            self._on_profile_changed("profile")
