"""Machine raters side by side: many matchers' outputs stored in the project, judged against
the gold labels of the audit slice, against each other, across prompt variants, combined into
ensembles, and a distilled student checked against its teacher.

``importing`` reads and checks matcher files, ``catalogue`` stores and loads them,
``side_by_side`` holds the figures per matcher, ``paired`` the paired differences between two
matchers on the same audit pairs, ``stability`` variants, ``ensembles`` majority vote and
Dawid–Skene, ``distillation`` teacher and student.
"""
