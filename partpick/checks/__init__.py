"""The checker: requirements, derating policies, circuit roles, corners, ranking, substitutes, yield.

Calls `partpick.physics` and the SQLAlchemy-free `partpick.library.fields`;
never Qt, never a database. The entry points are in `partpick.checks.service`.
"""
