"""Headless Chromium for the plan-page tests and benchmark (Selenium, Debian's chromium-driver)."""
from __future__ import annotations

import shutil
import tempfile

__all__ = ["NoBrowser", "start_chromium", "set_viewport"]

# the machine's closed network refuses every connection: keep the browser from trying
FLAGS = ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync", "--hide-scrollbars")


class NoBrowser(RuntimeError):
    """Selenium, chromium or chromedriver is missing (the message says which)."""


def start_chromium():
    """(driver, profile folder): headless Chromium with an empty profile, logging console and network."""
    try:
        from selenium import webdriver
        from selenium.webdriver.chrome.service import Service
    except ImportError:
        raise NoBrowser("selenium is not installed (pip install '.[test]')") from None
    chromium = shutil.which("chromium") or shutil.which("chromium-browser")
    driver = shutil.which("chromedriver")
    if not chromium or not driver:
        raise NoBrowser("no browser: Debian's chromium and chromium-driver are not installed "
                        "(apt-get install chromium chromium-driver)")
    opts = webdriver.ChromeOptions()
    opts.binary_location = chromium
    profile = tempfile.mkdtemp(prefix="lobeplan-chromium-")
    for flag in FLAGS + (f"--user-data-dir={profile}",):
        opts.add_argument(flag)
    opts.set_capability("goog:loggingPrefs", {"browser": "ALL", "performance": "ALL"})
    try:
        return webdriver.Chrome(service=Service(driver), options=opts), profile
    except Exception as exc:  # a browser that will not start is a missing browser here
        shutil.rmtree(profile, ignore_errors=True)
        raise NoBrowser(f"chromium did not start: {str(exc).splitlines()[0] if str(exc) else exc!r}") from None


def set_viewport(drv, width: int, height: int) -> None:
    """Make the page's own viewport width x height, whatever the window's frame and least size."""
    drv.set_window_size(max(width, 800), height + 200)
    drv.execute_cdp_cmd("Emulation.setDeviceMetricsOverride",
                        {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": False})
