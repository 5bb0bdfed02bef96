"""The shop's memory: computed-versus-measured deltas, calibration from past builds,
calibrated predictions and similar builds. Numbers and codes only; no words."""
from builder.history.analysis import (
    Analysis, SimilarLists, UnsizableBuilds, analyse, analyse_proposal,
)
from builder.history.calibration import Basis, Calibration, GroupCalibration, Prediction, calibrate
from builder.history.deltas import Deltas, deltas
from builder.history.similar import Difference, SimilarBuild, SimilarityIndex

__all__ = [
    "Analysis", "Basis", "Calibration", "Deltas", "Difference", "GroupCalibration", "Prediction",
    "SimilarBuild", "SimilarLists", "SimilarityIndex", "analyse", "analyse_proposal", "calibrate",
    "deltas", "UnsizableBuilds",
]
