"""Geometry optimization: a design's nodes moved (exact sensitivities, sequential LP in a
trust region), merged and pruned into a cleaner, never heavier layout (design -> design)."""

from bridgeopt.geometry.optimize import NodeMoves, default_moves, optimize_geometry

__all__ = ["NodeMoves", "default_moves", "optimize_geometry"]
