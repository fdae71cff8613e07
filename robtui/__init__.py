"""robtui: a terminal workbench for risk-of-bias assessment of randomised trials.

Suggestions made by robtui are candidates only; the reviewers decide.
"""

__version__ = "0.1.0"
