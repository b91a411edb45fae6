"""Smoke test: the package imports and reports a version."""

import errdist


def test_version_is_a_string() -> None:
    assert isinstance(errdist.__version__, str)
    assert errdist.__version__.count(".") == 2
