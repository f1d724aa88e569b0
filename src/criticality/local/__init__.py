"""Local analysis at an equilibrium: the stages every analysis shares.

Pipeline place: after the model, before the analyses.  Equilibria, Taylor
forms, the linear part and the critical set, the eigenbasis, the
center-manifold series, the planar normal form, the projection formula and the
n-dimensional normalization; :mod:`.prepare` builds the problem once.
"""
