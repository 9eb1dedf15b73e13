"""Choosing motors for an airframe: the fit filter, one batched flight of every candidate, reasons, ballast."""

from .rank import MatchResult, MatchSettings, candidate_rows, rank

__all__ = ["MatchResult", "MatchSettings", "candidate_rows", "rank"]
