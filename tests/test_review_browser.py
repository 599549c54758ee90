"""The review page in a real headless browser (Debian's chromium + chromedriver, installed by .ci/run):
load a queue, open a category, click Accept, and see the decision stored. Skips when no browser is found."""

import shutil
import threading

import pytest

from pipeline.store import open_store
from review_graphs import build, edges_of

webdriver = pytest.importorskip("selenium.webdriver", reason="selenium is not installed (pip install -e '.[test]')")

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
DRIVER = shutil.which("chromedriver")
pytestmark = pytest.mark.skipif(not (CHROMIUM and DRIVER),
                                reason="no chromium/chromedriver on PATH (apt-get install chromium chromium-driver)")


@pytest.fixture
def page(tmp_path):
    from selenium.webdriver.chrome.options import Options
    from selenium.webdriver.chrome.service import Service

    from pipeline.review.web.server import make_server

    store = build(tmp_path)
    server, _ = make_server(store, host="127.0.0.1", port=0, by="ana")
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    opts = Options()
    opts.binary_location = CHROMIUM
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
                "--window-size=1280,900"):
        opts.add_argument(arg)
    driver = webdriver.Chrome(service=Service(executable_path=DRIVER), options=opts)
    driver.set_page_load_timeout(30)
    try:
        yield driver, f"http://127.0.0.1:{server.effective_port}", store
    finally:
        driver.quit()
        server.close()


def test_load_queue_decide_and_see_it_stored(page):
    from selenium.webdriver.common.by import By
    from selenium.webdriver.support import expected_conditions as ec
    from selenium.webdriver.support.ui import WebDriverWait

    driver, base, store = page
    driver.get(base + "/queue/uncertain")
    rows = driver.find_elements(By.CSS_SELECTOR, "#queue-table tr.row")
    assert [r.get_attribute("data-uid") for r in rows] == ["shop:3", "shop:5"]
    rows[0].click()
    WebDriverWait(driver, 10).until(ec.presence_of_element_located((By.ID, "cand-list")))
    assert "Garden > Mowers" in driver.find_element(By.TAG_NAME, "h1").text
    driver.find_element(By.ID, "note").send_keys("checked in the browser")
    driver.find_element(By.CSS_SELECTOR, 'button.accept[data-concept="LM"]').click()
    WebDriverWait(driver, 10).until(lambda d: d.execute_script("return document.body.dataset.lastDecision")
                                    == "applied")
    with open_store(store, read_only=True) as s:
        assert edges_of(s, "shop:3") == {"LM": "accepted"}
        hist = s.frame("review_events_category", category="shop:3").to_dict("records")
        assert (hist[-2]["action"], hist[-2]["actor"], hist[-2]["note"]) == ("accepted", "ana",
                                                                          "checked in the browser")
    # the page moves on to the next category of the queue
    WebDriverWait(driver, 10).until(lambda d: "uid=shop%3A5" in d.current_url or "uid=shop:5" in d.current_url)


def test_keyboard_reject(page):
    from selenium.webdriver.common.by import By
    from selenium.webdriver.support.ui import WebDriverWait

    driver, base, store = page
    driver.get(base + "/category?uid=shop:5&queue=uncertain")
    body = driver.find_element(By.TAG_NAME, "body")
    body.send_keys("j")  # select the second candidate (KC)
    body.send_keys("r")
    WebDriverWait(driver, 10).until(lambda d: d.execute_script("return document.body.dataset.lastDecision")
                                    == "applied")
    with open_store(store, read_only=True) as s:
        assert edges_of(s, "shop:5") == {"PA": "auto", "KC": "rejected"}
