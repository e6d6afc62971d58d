"""report.html in a real browser (headless Chromium through selenium's WebDriver).

Checks what a reader does with the page: the parts table has a row per
part, a header click sorts it (natural order of part names, numbers as
numbers), a verdict button hides the other rows, the search box narrows
them, and an opened part shows its waveform plot with a non-zero size.
Skipped, with the reason, where Chromium or its driver is not installed
(``scripts/setup.sh --test`` installs both).
"""

from __future__ import annotations

import re
import shutil
from pathlib import Path

import pytest

from incircuit.report import write_report

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
DRIVER = shutil.which("chromedriver")

pytestmark = pytest.mark.skipif(
    not (CHROMIUM and DRIVER),
    reason="headless browser test: chromium and chromedriver are not installed "
           "(scripts/setup.sh --test installs them)")


@pytest.fixture(scope="module")
def browser(tmp_path_factory):
    webdriver = pytest.importorskip("selenium.webdriver", reason="selenium is not installed")
    from selenium.webdriver.chrome.options import Options
    from selenium.webdriver.chrome.service import Service

    options = Options()
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
                "--disable-component-update", "--disable-sync", "--no-first-run",
                "--window-size=1300,1000", f"--user-data-dir={tmp_path_factory.mktemp('chromium-profile')}"):
        options.add_argument(arg)
    options.binary_location = CHROMIUM
    driver = webdriver.Chrome(options=options, service=Service(DRIVER))
    driver.set_page_load_timeout(60)
    yield driver
    driver.quit()


@pytest.fixture(scope="module")
def page(browser, masked_survey, tmp_path_factory):
    folder = tmp_path_factory.mktemp("report")
    write_report(folder, masked_survey.to_dict(), masked_survey.traces)
    browser.get((folder / "report.html").resolve().as_uri())
    return browser


def _visible(driver) -> list[str]:
    return driver.execute_script(
        "return Array.from(document.querySelectorAll('#parts-table > tbody'))"
        ".filter(function (tb) { return !tb.hidden && tb.offsetParent !== null; })"
        ".map(function (tb) { return tb.getAttribute('data-part'); });")


def _header(driver, key):
    from selenium.webdriver.common.by import By
    return driver.find_element(By.CSS_SELECTOR, f'#parts-table > thead th[data-key="{key}"]')


def _reset(driver):
    from selenium.webdriver.common.by import By
    search = driver.find_element(By.ID, "search")
    search.clear()
    driver.find_element(By.CSS_SELECTOR, 'button[data-verdict="all"]').click()


def test_table_has_a_row_per_part(page, masked_survey):
    names = [r["part"] for r in masked_survey.records]
    assert _visible(page) == names
    assert "5 of 5 parts shown" in page.find_element("id", "shown").text


def test_header_click_sorts_and_reverses(page):
    _reset(page)
    _header(page, "part").click()
    assert _visible(page) == ["C1", "R1", "R2", "R5", "RB"]  # natural order of names
    _header(page, "part").click()
    assert _visible(page) == ["RB", "R5", "R2", "R1", "C1"]
    assert _header(page, "part").get_attribute("aria-sort") == "descending"
    _header(page, "value").click()  # numbers as numbers: 100 nF < 100 ohm < 10 kohm < 47 kohm
    values = page.execute_script(
        "return Array.from(document.querySelectorAll('#parts-table > tbody'))"
        ".map(function (tb) { return parseFloat(tb.getAttribute('data-sort-value')); });")
    assert values == sorted(values)


def test_verdict_filter_hides_the_other_rows(page, masked_survey):
    from selenium.webdriver.common.by import By
    _reset(page)
    page.find_element(By.CSS_SELECTOR, 'button[data-verdict="masked"]').click()
    masked = sorted(r["part"] for r in masked_survey.records if r["verdict"] == "masked")
    assert sorted(_visible(page)) == masked and masked
    page.find_element(By.CSS_SELECTOR, 'button[data-verdict="all"]').click()
    assert len(_visible(page)) == len(masked_survey.records)


def test_search_narrows_the_rows(page):
    from selenium.webdriver.common.by import By
    _reset(page)
    page.find_element(By.ID, "search").send_keys("r5")
    assert _visible(page) == ["R5"]
    page.find_element(By.ID, "search").clear()
    page.find_element(By.ID, "search").send_keys("capacitor")  # words of the readings count too
    assert "C1" in _visible(page) and "R5" not in _visible(page)


def test_opened_part_shows_its_plot(page, tmp_path):
    from selenium.webdriver.common.by import By
    _reset(page)
    toggle = page.find_element(By.CSS_SELECTOR, "#part-R1 button.toggle")
    toggle.click()
    assert toggle.get_attribute("aria-expanded") == "true"
    size = page.execute_script(
        "var s = document.querySelector('#part-R1-detail figure svg');"
        "var r = s.getBoundingClientRect(); return [r.width, r.height];")
    assert size[0] > 100 and size[1] > 50
    texts = page.execute_script(
        "return Array.from(document.querySelectorAll('#part-R1-detail svg text')).map(function (t) {"
        " return t.textContent; });")
    assert any(re.search(r"R1 (alone|in circuit)", t) for t in texts)
    page.execute_script("document.getElementById('part-R1').scrollIntoView();")
    shot = Path(tmp_path) / "report.png"
    page.save_screenshot(str(shot))
    assert shot.stat().st_size > 10_000
