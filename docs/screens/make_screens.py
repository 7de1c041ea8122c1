"""Screenshots of each study at its defaults, for reviewers who do not run the workbook.

For every notebook in studies/, runs ``bridgeopt report`` (defaults, no overrides) into
docs/screens/NAME.html (not committed) and takes a 1200 x 1400 PNG of it with headless
Chromium, network blocked (the page must render offline). Usage::

    .venv/bin/python docs/screens/make_screens.py            # all studies
    .venv/bin/python docs/screens/make_screens.py explorer   # one
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
STUDIES = HERE.parents[1] / "studies"
SIZE = (1200, 1400)


def screenshot(html: Path, png: Path, browser: str) -> None:
    with tempfile.TemporaryDirectory() as profile:
        subprocess.run([browser, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                        "--no-first-run", "--disable-background-networking",
                        "--disable-component-update", "--disable-sync", "--hide-scrollbars",
                        f"--user-data-dir={profile}", "--host-resolver-rules=MAP * ~NOTFOUND",
                        f"--window-size={SIZE[0]},{SIZE[1]}", "--virtual-time-budget=10000",
                        f"--screenshot={png}", html.as_uri()],
                       check=True, capture_output=True, timeout=300)


def main(names: list[str]) -> None:
    browser = shutil.which("chromium") or shutil.which("chromium-browser")
    if browser is None:
        sys.exit("make_screens: chromium is needed (apt-get install chromium)")
    for nb in sorted(STUDIES.glob("*.ipynb")):
        if names and nb.stem not in names:
            continue
        html = HERE / f"{nb.stem}.html"
        subprocess.run([sys.executable, "-m", "bridgeopt", "report", str(nb), "-o", str(html)],
                       check=True)
        screenshot(html, HERE / f"{nb.stem}.png", browser)
        html.unlink()
        print(f"docs/screens/{nb.stem}.png")


if __name__ == "__main__":
    main(sys.argv[1:])
