"""Training the evidence ranker (scikit-learn): the corpus loader, labelled documents, metrics.

The runtime ranker (robtui.evidence) never imports this package; benchmarks and the
`train-ranker` command do.
"""
