"""Benchmark (not a test): a worker's peak memory while it cleans one large photo (inspections.photos.clean_photo).

    .venv/bin/python benchmarks/photo_memory.py [--only NAME]

Each case runs in a fresh child process that imports Legwork as a web worker does (Django set up, the photo
cleaner imported), notes its resident memory, cleans one photo read from a file and prints its peak resident
memory (VmHWM: ru_maxrss would carry the parent's peak over the exec) and the time taken. The photos are made
by another child in a temporary folder and removed afterwards:

  * the issue's case: a PNG of 39.9 megapixels (under the old 40 MP limit), refused now from its header;
  * a PNG and a PNG with transparency just under the 16 MP full-decode limit (the worst a PNG can do now);
  * camera JPEGs of 12, 48 and 64 MP: the last two are read at half scale (Pillow's draft mode).

Target (issue 14): a few hundred MB at most per photo, down from 888 MB.
"""

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

CASES = {
    "png-39.9MP (the issue's photo)": ("PNG", "RGB", (7300, 5466)),
    "png-16MP": ("PNG", "RGB", (4618, 3464)),
    "png-16MP-transparent": ("PNG", "RGBA", (4618, 3464)),
    "jpeg-12MP (tablet camera)": ("JPEG", "RGB", (4032, 3024)),
    "jpeg-48MP": ("JPEG", "RGB", (8000, 6000)),
    "jpeg-64MP": ("JPEG", "RGB", (9216, 6912)),
}


def _make(path: Path, fmt: str, mode: str, size) -> None:
    from PIL import Image, ImageDraw

    image = Image.new(mode, size, (120, 130, 140, 255)[: len(mode)])
    draw = ImageDraw.Draw(image)
    for x in range(0, size[0], 97):  # some edges, so the encoders have something to do
        draw.line([(x, 0), (size[0] - x, size[1])], fill=(200, 60, 20, 255)[: len(mode)], width=3)
    image.save(path, fmt, **({"quality": 90} if fmt == "JPEG" else {"compress_level": 6}))


def _peak_mb() -> float:
    """This process's peak resident memory (Linux VmHWM), in MB."""
    for line in Path("/proc/self/status").read_text().splitlines():
        if line.startswith("VmHWM:"):
            return int(line.split()[1]) / 1024
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def _child(path: str) -> None:
    import django

    django.setup()
    from django.core.files import File

    from inspections.photos import PhotoError, clean_photo

    before = _peak_mb()
    started = time.perf_counter()
    with open(path, "rb") as handle:
        try:
            clean = clean_photo(File(handle, name=Path(path).name))
            outcome = f"stored {clean.width} x {clean.height}, {len(clean.content) / 1e6:.1f} MB"
        except PhotoError as exc:
            outcome = f"refused: {exc}"
    seconds = time.perf_counter() - started
    print(json.dumps({"before_mb": before, "peak_mb": _peak_mb(), "seconds": seconds, "outcome": outcome}))


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--only")
    parser.add_argument("--child")
    parser.add_argument("--make", nargs=5)
    args = parser.parse_args()
    if args.child:
        return _child(args.child)
    if args.make:
        path, fmt, mode, width, height = args.make
        return _make(Path(path), fmt, mode, (int(width), int(height)))
    print(f"load average {os.getloadavg()[0]:.2f}; photo limits as settings read them from the environment")
    print(f"{'case':<32} {'file':>9} {'worker before':>14} {'peak':>9} {'time':>7}  outcome")
    with tempfile.TemporaryDirectory(prefix="legwork-photo-bench-") as folder:
        env = {**os.environ, "DJANGO_SETTINGS_MODULE": "legwork.settings", "LEGWORK_VAR_DIR": folder,
               "PYTHONPATH": str(ROOT)}
        for name, (fmt, mode, size) in CASES.items():
            if args.only and args.only not in name:
                continue
            path = Path(folder) / f"photo.{fmt.lower()}"
            subprocess.run([sys.executable, __file__, "--make", str(path), fmt, mode, *map(str, size)], check=True)
            result = subprocess.run([sys.executable, __file__, "--child", str(path)], env=env, cwd=ROOT,
                                    capture_output=True, text=True, check=True)
            figures = json.loads(result.stdout.strip().splitlines()[-1])
            print(f"{name:<32} {path.stat().st_size / 1e6:>7.1f}MB {figures['before_mb']:>11.0f} MB "
                  f"{figures['peak_mb']:>6.0f} MB {figures['seconds']:>6.2f}s  {figures['outcome'][:70]}")
            path.unlink()


if __name__ == "__main__":
    main()
