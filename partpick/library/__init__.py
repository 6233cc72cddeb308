"""The parts library: storage (SQLAlchemy), CSV import/export, the example library.

Kept free of imports so that ``import partpick.library.fields`` (used by the
checker) never loads SQLAlchemy. The store lives in `partpick.library.store`.
"""
