"""Rebuild the review-page screenshots in docs/screenshots/ from the invented demo scenario.

    python docs/make_screenshots.py            # needs chromium + chromedriver (Debian: apt-get install chromium
                                               # chromium-driver) and selenium (pip install -e '.[test]')
"""

from __future__ import annotations

import shutil
import tempfile
import threading
from pathlib import Path

from selenium import webdriver
from selenium.webdriver.chrome.options import Options
from selenium.webdriver.chrome.service import Service

from pipeline.jobs.demo import run_demo
from pipeline.review.decisions import Decision, apply_decisions
from pipeline.review.queues import review_queue
from pipeline.review.web.server import make_server
from pipeline.store import open_store

OUT = Path(__file__).resolve().parent / "screenshots"


def main() -> None:
    tmp = Path(tempfile.mkdtemp(prefix="graftwork-shots-"))
    store = tmp / "demo.lbug"
    run_demo(store, data_dir=tmp / "data", n_items=3000, seed=7)
    with open_store(store) as s:
        first = review_queue(s, "uncertain", limit=2)
        if first and first[0].candidates:  # one decision, so the history panel has a person in it
            e = first[1] if len(first) > 1 else first[0]
            apply_decisions(s, [Decision("accept", e.source, e.code, e.candidates[0]["concept_code"],
                                         by="steward-demo", note="checked against the item titles")])
        target = review_queue(s, "uncertain", limit=1)[0]
    server, _ = make_server(store, port=0, by="steward-demo")
    threading.Thread(target=server.run, daemon=True).start()
    base = f"http://127.0.0.1:{server.effective_port}"
    opts = Options()
    opts.binary_location = shutil.which("chromium") or "chromium"
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--window-size=1360,900",
                "--hide-scrollbars"):
        opts.add_argument(arg)
    driver = webdriver.Chrome(service=Service(executable_path=shutil.which("chromedriver")), options=opts)
    try:
        OUT.mkdir(parents=True, exist_ok=True)
        driver.get(base + "/queue/uncertain?limit=12")
        driver.save_screenshot(str(OUT / "review-queue.png"))
        driver.get(f"{base}/category?uid={target.uid}&queue=uncertain")
        driver.save_screenshot(str(OUT / "review-category.png"))
        driver.get(base + "/queue/conflicting?limit=12")
        driver.save_screenshot(str(OUT / "review-conflicting.png"))
    finally:
        driver.quit()
        server.close()
    print(f"wrote {', '.join(p.name for p in sorted(OUT.glob('*.png')))} to {OUT}")


if __name__ == "__main__":
    main()
