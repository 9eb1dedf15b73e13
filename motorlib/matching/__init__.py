"""Choosing motors for an airframe: the fit filter, one batched flight of every candidate, reasons, ballast."""

from .candidate import Candidate
from .rank import MatchResult, MatchSettings, candidate_rows, rank

__all__ = ["Candidate", "MatchResult", "MatchSettings", "candidate_rows", "rank"]
