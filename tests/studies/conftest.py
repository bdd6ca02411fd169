"""Markers for the study tests (registered here so that the shared configuration stays untouched)."""


def pytest_configure(config):
    config.addinivalue_line("markers", "slow: takes more than about 10 s on the shared machine")
