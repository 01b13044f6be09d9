"""Writes src/chart/font/DejaVuSans-subset.ttf, the one typeface of every chart.

The subset of DejaVu Sans (Debian's fonts-dejavu-core, version 2.37) that
charts use: Latin letters with their accents, Greek, general punctuation,
super- and subscripts, arrows and the mathematical operators (√, −, ≈, ≤).
Licence: the Bitstream Vera licence with the DejaVu changes in the public
domain (src/chart/font/LICENSE.txt); a subset is allowed as long as the
font's name contains neither "Bitstream" nor "Vera".

Needs fontTools (pip install fonttools) and the fonts-dejavu-core package:
    python3 xtask/make_font.py
Run it only to change the subset; the output is committed.
"""

import pathlib
import subprocess

ROOT = pathlib.Path(__file__).resolve().parent.parent
SOURCE = "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf"
OUT = ROOT / "src" / "chart" / "font" / "DejaVuSans-subset.ttf"
RANGES = [
    "U+0020-007E",  # ASCII
    "U+00A0-017F",  # Latin-1 and Latin Extended-A
    "U+0391-03C9",  # Greek
    "U+2010-2027",  # dashes, quotes, bullet, ellipsis
    "U+2030-203A",  # per mille, primes, angle quotes
    "U+2070-209C",  # superscripts and subscripts
    "U+2190-2193",  # arrows
    "U+2200-2265",  # mathematical operators
]

subprocess.run(
    [
        "pyftsubset",
        SOURCE,
        "--unicodes=" + ",".join(RANGES),
        "--layout-features=kern",
        "--no-hinting",
        "--name-IDs=*",
        "--drop-tables+=FFTM",
        f"--output-file={OUT}",
    ],
    check=True,
)
print(f"wrote {OUT} ({OUT.stat().st_size} bytes)")
