"""The assessment screen (screen.py) and the modules it is made of."""

from robtui.tui.screens.assessment.screen import AssessmentScreen

__all__ = ["AssessmentScreen"]
