"""Clean a photo from the tablet before it is stored: allow-listed formats, size and pixel limits, orientation
applied, every metadata and comment segment dropped by re-encoding, a thumbnail made, the stored bytes hashed.

Pillow only reads JPEG, PNG and WebP here (`formats=`), so no other decoder ever sees an upload. HEIF/HEIC
(the iPhone default) is refused: Pillow cannot read it without a plugin; the camera input on a web page hands
over JPEG on current tablets.

Memory is bounded by what is decoded, not by what is uploaded. The header's size is checked before any pixel is
read. A PNG or WebP is decoded at full size, so it may have at most LEGWORK_PHOTO_MAX_PIXELS (16 MP: about 50 MB
as RGB, 64 MB with transparency). A JPEG (what cameras make) may have up to LEGWORK_PHOTO_MAX_JPEG_PIXELS (64 MP)
because the JPEG decoder can read it at 1/2, 1/4 or 1/8 scale (Pillow's draft mode): it is decoded at the first
scale that fits LEGWORK_PHOTO_MAX_PIXELS and stored at that size. benchmarks/photo_memory.py measures the peak.

Nothing but pixels survives: the image's `info` (EXIF, XMP, ICC profile, PNG text chunks, the JPEG COM comment,
which Pillow would otherwise write back) is emptied before saving, and no metadata argument is passed.
"""

import hashlib
import io
import threading
import warnings
from contextlib import contextmanager
from dataclasses import dataclass

from django.conf import settings
from PIL import Image, ImageFile, ImageOps, UnidentifiedImageError

ALLOWED = {"JPEG": ("image/jpeg", "jpg"), "PNG": ("image/png", "png"), "WEBP": ("image/webp", "webp")}
THUMBNAIL_PX = 320
JPEG_QUALITY = 88


class PhotoError(ValueError):
    """An upload that is not stored; the message says why and what would do."""


@dataclass(frozen=True)
class CleanPhoto:
    content: bytes
    thumbnail: bytes
    content_type: str
    extension: str
    width: int
    height: int
    sha256: str


def clean_photo(upload) -> CleanPhoto:
    """Check and re-encode an uploaded file (a Django UploadedFile or any binary file object with .size)."""
    max_bytes = settings.LEGWORK_PHOTO_MAX_BYTES
    max_pixels = settings.LEGWORK_PHOTO_MAX_PIXELS
    max_jpeg_pixels = max(max_pixels, settings.LEGWORK_PHOTO_MAX_JPEG_PIXELS)
    size = getattr(upload, "size", None)
    if size is None:
        upload.seek(0, io.SEEK_END)
        size = upload.tell()
    if size == 0:
        raise PhotoError("The file is empty: take the photo again.")
    if size > max_bytes:
        raise PhotoError(f"The photo is {_mb(size)}; the limit is {_mb(max_bytes)}. Take it at a lower resolution.")
    upload.seek(0)
    try:
        with _strict_pillow(max_jpeg_pixels), warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            with Image.open(upload, formats=list(ALLOWED)) as image:
                fmt = "JPEG" if image.format == "MPO" else image.format  # a phone's multi-picture JPEG: the first
                width, height = image.size
                limit = max_jpeg_pixels if fmt == "JPEG" else max_pixels
                if width * height > limit:
                    raise PhotoError(_too_many(width, height, limit))
                if fmt == "JPEG" and width * height > max_pixels:
                    image.draft(image.mode if image.mode in ("RGB", "L") else "RGB", _draft_size(width, height,
                                                                                                  max_pixels))
                image.load()
                if image.width * image.height > max_pixels:  # draft cannot reduce it enough (a 1/8 scale limit)
                    raise PhotoError(_too_many(width, height, max_pixels))
                cleaned = _reencode(ImageOps.exif_transpose(image), fmt)
    except PhotoError:
        raise
    except (Image.DecompressionBombError, Image.DecompressionBombWarning):
        raise PhotoError(f"The image is larger than {max_pixels:,} pixels and was refused "
                         "(it may be a decompression bomb).") from None
    except UnidentifiedImageError:
        raise PhotoError("Only JPEG, PNG and WebP photos can be attached (HEIC: set the camera to "
                         "'most compatible' or export as JPEG).") from None
    except (OSError, SyntaxError, ValueError, EOFError) as exc:
        raise PhotoError(f"The photo could not be read ({type(exc).__name__}): it may be damaged or cut short; "
                         "take it again.") from None
    return cleaned


def _draft_size(width: int, height: int, max_pixels: int) -> tuple[int, int]:
    """The size to ask the JPEG decoder for: the first of 1/2, 1/4, 1/8 scale within max_pixels (draft picks the
    largest reduction that still gives at least the size asked)."""
    for scale in (2, 4, 8):
        size = (-(-width // scale), -(-height // scale))
        if size[0] * size[1] <= max_pixels:
            return size
    return (-(-width // 8), -(-height // 8))


_PILLOW_GLOBALS = threading.Lock()


@contextmanager
def _strict_pillow(max_pixels):
    """Pillow's limits are process globals: set ours while decoding and put back what was there.

    WeasyPrint sets ImageFile.LOAD_TRUNCATED_IMAGES = True when imported (it draws what it can of a broken image);
    an upload cut short must be refused instead, so it is off while a photo is decoded. Pillow's own bomb guard
    reads MAX_IMAGE_PIXELS (a warning at the limit, an error at twice it); we refuse at the limit.
    """
    with _PILLOW_GLOBALS:
        saved = ImageFile.LOAD_TRUNCATED_IMAGES, Image.MAX_IMAGE_PIXELS
        ImageFile.LOAD_TRUNCATED_IMAGES, Image.MAX_IMAGE_PIXELS = False, max_pixels
        try:
            yield
        finally:
            ImageFile.LOAD_TRUNCATED_IMAGES, Image.MAX_IMAGE_PIXELS = saved


def _reencode(image: Image.Image, fmt: str) -> CleanPhoto:
    """Write the pixels only: `info` emptied (Pillow writes a JPEG comment, an ICC profile or XMP back from it) and
    no exif=, icc_profile=, pnginfo=, comment= passed, so no metadata survives."""
    content_type, extension = ALLOWED[fmt]
    if fmt == "JPEG":
        image = _flat(image)
    elif image.mode not in ("RGB", "RGBA", "L", "LA") or "transparency" in image.info:
        image = image.convert("RGBA" if "A" in image.getbands() or "transparency" in image.info else "RGB")
    image.info = {}
    out = io.BytesIO()
    if fmt == "JPEG":
        image.save(out, "JPEG", quality=JPEG_QUALITY, optimize=True)
    elif fmt == "PNG":
        image.save(out, "PNG", compress_level=6)  # optimize=True took 10 s for 16 MP on the 2-core machine
    else:
        image.save(out, "WEBP", quality=JPEG_QUALITY)
    content = out.getvalue()

    ratio = min(1, THUMBNAIL_PX / max(image.size))
    size = (max(1, round(image.width * ratio)), max(1, round(image.height * ratio)))
    thumb = _flat(image.resize(size, Image.Resampling.LANCZOS, reducing_gap=3.0))  # small and new, not a full copy
    thumb.info = {}
    thumb_out = io.BytesIO()
    thumb.save(thumb_out, "JPEG", quality=80)
    return CleanPhoto(content=content, thumbnail=thumb_out.getvalue(), content_type=content_type,
                      extension=extension, width=image.width, height=image.height,
                      sha256=hashlib.sha256(content).hexdigest())


def _flat(image: Image.Image) -> Image.Image:
    """RGB for JPEG: transparency over white, palettes and odd modes converted."""
    if image.mode in ("RGBA", "LA") or (image.mode == "P" and "transparency" in image.info):
        rgba = image.convert("RGBA")
        background = Image.new("RGB", rgba.size, (255, 255, 255))
        background.paste(rgba, mask=rgba.getchannel("A"))
        return background
    if image.mode not in ("RGB", "L"):
        return image.convert("RGB")
    return image


def _mb(n: int) -> str:
    return f"{n / (1024 * 1024):.1f} MB"


def _too_many(width: int, height: int, limit: int) -> str:
    return f"The image is {width} x {height} = {width * height:,} pixels; the limit is {limit:,}. Take it smaller."
