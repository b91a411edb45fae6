"""Smoke test: the package imports and reports a version."""

import errdist


def test_version_is_a_string() -> None:
    assert isinstance(errdist.__version__, str)
    assert errdist.__version__.count(".") == 2


def test_public_api_names_resolve() -> None:
    for name in errdist.__all__:
        assert hasattr(errdist, name), name
