"""The shop's memory: computed-versus-measured deltas, calibration from past builds,
calibrated predictions and similar builds."""
from builder.history.analysis import (
    Analysis, SimilarLists, analyse, analyse_proposal, geometry_problems,
)
from builder.history.calibration import (
    Calibration, GroupCalibration, Prediction, calibrate, calibration_description,
)
from builder.history.deltas import Deltas, deltas
from builder.history.similar import SimilarBuild, SimilarityIndex, distance_description

__all__ = [
    "Analysis", "Calibration", "Deltas", "GroupCalibration", "Prediction", "SimilarBuild",
    "SimilarLists", "SimilarityIndex", "analyse", "analyse_proposal", "calibrate",
    "calibration_description", "deltas", "distance_description", "geometry_problems",
]
