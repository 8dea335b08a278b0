"""People's labels: reviewers and roles, agreement, adjudication, gold labels, merging
offline copies and bulk labels."""
