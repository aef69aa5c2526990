"""The project without Qt: vessels, measurements, requests and findings (:mod:`.model`), and the
session files that store them (:mod:`.session`)."""

from .model import HandCorrections, MeasureKind, Measurement, Project, Vessel

__all__ = ["HandCorrections", "Measurement", "MeasureKind", "Project", "Vessel"]
