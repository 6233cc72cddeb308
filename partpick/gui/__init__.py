"""The desktop app: Qt-free models (`models`, `commands`) and thin Qt views over them.

The window computes nothing itself. Every number it shows comes from
`partpick.checks.service.run_check` (the same call as ``partpick check``), the
curves from `partpick.checks.curves` drawn by `partpick.plots`, and every part
from `partpick.library.store`.
"""
