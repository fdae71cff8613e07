"""A review folder on disk: review.toml, reports, assessments per reviewer, consensus, exports."""
