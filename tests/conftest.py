"""Fixtures shared by the workbench tests."""
import pytest


@pytest.fixture
def wb():
    """A fresh workbench on its demo data; at the end, no callback may have hit an unexpected exception."""
    from widgets import Workbench

    w = Workbench()
    yield w
    assert w.messages.faults == [], w.messages.faults  # no unexpected exception in any callback
    w.close()
