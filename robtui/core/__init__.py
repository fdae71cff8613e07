"""The pure core: question sets, the judgement algorithm, the data model, agreement statistics.

Nothing in this package reads or writes files, or imports a user interface.
"""
