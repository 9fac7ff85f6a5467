"""The page of kindred serve in a real browser (headless Chromium driven by
Selenium): paste an upload, submit, read the matches and the highlighted
passages. Skips, saying so, only when Chromium is not installed.
Usage: serve_browser.py KINDRED_BINARY SOURCE_DIR"""

import os
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, jsonl, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
CHROMIUM = shutil.which("chromium")
DRIVER = shutil.which("chromedriver")
if CHROMIUM is None or DRIVER is None:
    print("SKIP: the browser test needs chromium and chromium-driver (tools/setup.sh installs them)")
    sys.exit(0)

from selenium import webdriver  # noqa: E402
from selenium.webdriver.chrome.service import Service  # noqa: E402
from selenium.webdriver.common.by import By  # noqa: E402
from selenium.webdriver.support import expected_conditions  # noqa: E402
from selenium.webdriver.support.ui import WebDriverWait  # noqa: E402

T = tempfile.mkdtemp()
INDEX = os.path.join(T, "archive.kin")
assert run([K, "build", INDEX, os.path.join(SRC, "sample_corpus", "archive"), "-q"]).returncode == 0
upload = os.path.join(SRC, "sample_corpus", "submissions", "story-copied.txt")
with open(upload, encoding="utf-8") as f:
    text = f.read()
cli = jsonl(run([K, "check", INDEX, upload, "-q"]).stdout)
check(cli, "the copied story matches on the command line")

server = Server(K, INDEX, "-q", workdir=T)
options = webdriver.ChromeOptions()
options.binary_location = CHROMIUM
for flag in ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
             "--disable-component-update", "--disable-sync", "--no-first-run",
             "--disable-dev-shm-usage", "--user-data-dir=" + os.path.join(T, "profile")]:
    options.add_argument(flag)
driver = webdriver.Chrome(service=Service(DRIVER), options=options)
try:
    driver.get("http://127.0.0.1:%d/" % server.port)
    check("not proof of copying" in driver.find_element(By.CLASS_NAME, "caution").text,
          "the page states the caution")
    box = driver.find_element(By.ID, "text")
    # Typing 3 KB key by key is slow; set the value as a paste would.
    driver.execute_script("arguments[0].value = arguments[1];", box, text)
    driver.find_element(By.ID, "submit").click()
    WebDriverWait(driver, 20).until(
        expected_conditions.presence_of_element_located((By.ID, "summary")))
    rows = driver.find_elements(By.CSS_SELECTOR, "tr.match")
    shown = {r.get_attribute("data-match"): r.find_element(By.CLASS_NAME, "jaccard").text for r in rows}
    want = {m["match"]: "%.4f" % m["jaccard"] for m in cli}
    check(shown == want, "matches on the page %s, on the command line %s" % (shown, want))
    marks = driver.find_elements(By.CSS_SELECTOR, ".passages mark")
    check(marks, "highlighted passages")
    marked = [m.text for m in marks]
    check(all(m and m in text for m in marked), "each highlighted passage is upload text")
    check(sum(len(m) for m in marked) > len(text) / 2,
          "most of a copied story is highlighted (%d of %d characters)"
          % (sum(len(m) for m in marked), len(text)))
    check(not driver.find_elements(By.CSS_SELECTOR, "[src^='http'], link[href]"),
          "no external resources")
finally:
    driver.quit()
server.stop()
shutil.rmtree(T)
finish()
