"""A fast, exact PNG encoder for figure pixels sent to the browser.

Panels send a new picture on every slider step, so the encode is on the path
the analyst feels. Pillow's PNG writer tries every row filter and costs about
6-10 ms for a 760 x 400 figure; this one writes rows unfiltered and deflates
them with zlib at level 1, about 2 ms for the same pixels and a file of about
the same size (figures are mostly flat colour, which deflate packs well
without filters). The picture is exact: the PNG decodes to the same bytes.
``benchmarks/bench_widgets.py`` measures both, side by side.

A static view sends a whole PNG after every step; :class:`FrameEncoder`
deflates again only the bands of rows that changed since its last frame and
reuses the others' compressed bytes: the same exact picture, for a fraction
of the deflate when a step moves one plot.
"""

from __future__ import annotations

import struct
import zlib

import numpy as np

__all__ = ["FrameEncoder", "encode_png"]

_SIGNATURE = b"\x89PNG\r\n\x1a\n"
#: PNG colour types: 2 is RGB, 6 is RGBA (PNG specification, section 11.2.2).
_COLOUR_TYPE = {3: 2, 4: 6}


def _chunk(tag: bytes, data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + tag + data + struct.pack(">I", zlib.crc32(tag + data))


def _checked(pixels: np.ndarray) -> np.ndarray:
    pixels = np.asarray(pixels)
    if pixels.dtype != np.uint8 or pixels.ndim != 3 or pixels.shape[2] not in (3, 4):
        raise ValueError(f"`pixels` must be uint8 of shape (h, w, 3 or 4), got {pixels.dtype} {pixels.shape}")
    return pixels


def _opaque(pixels: np.ndarray) -> bool:
    return pixels.shape[2] == 3 or bool((pixels[:, :, 3] == 255).all())


def _without_alpha(pixels: np.ndarray) -> np.ndarray:
    """RGB of RGBA pixels. Pillow drops the channel in one pass (about 0.7 ms for a panel's figure);
    NumPy's strided copy of three bytes in four takes about 3 ms."""
    from PIL import Image

    height, width = pixels.shape[:2]
    rgba = Image.frombuffer("RGBA", (width, height), np.ascontiguousarray(pixels), "raw", "RGBA", 0, 1)
    return np.asarray(rgba.convert("RGB"))


def _rgb_or_rgba(pixels: np.ndarray, keep_alpha: bool | None) -> np.ndarray:
    """The pixels checked, without the alpha channel unless it is kept (None: kept when not opaque)."""
    pixels = _checked(pixels)
    if pixels.shape[2] == 4 and not (not _opaque(pixels) if keep_alpha is None else keep_alpha):
        pixels = _without_alpha(pixels)
    return pixels


def _rows(pixels: np.ndarray) -> np.ndarray:
    """PNG scanlines: each row of pixels after its filter-type byte 0 (none)."""
    height, width, channels = pixels.shape
    rows = np.empty((height, width * channels + 1), np.uint8)
    rows[:, 0] = 0
    rows[:, 1:] = pixels.reshape(height, width * channels)
    return rows


def _png(width: int, height: int, channels: int, idat: bytes) -> bytes:
    header = struct.pack(">IIBBBBB", width, height, 8, _COLOUR_TYPE[channels], 0, 0, 0)
    return b"".join([_SIGNATURE, _chunk(b"IHDR", header), _chunk(b"IDAT", idat), _chunk(b"IEND", b"")])


def encode_png(pixels: np.ndarray, *, level: int = 1, keep_alpha: bool | None = None) -> bytes:
    """PNG bytes of an (height, width, 3 or 4) uint8 image.

    Parameters
    ----------
    pixels : ndarray, shape (height, width, 3) or (height, width, 4), uint8
    level : int
        zlib compression level, 0 (store) to 9; 1 is the fastest that packs.
    keep_alpha : bool or None
        Write the alpha channel; None keeps it only when some pixel is not
        opaque (an opaque figure is sent as RGB, a quarter fewer bytes).

    Examples
    --------
    >>> import io
    >>> import numpy as np
    >>> from PIL import Image
    >>> pixels = np.zeros((2, 3, 4), np.uint8); pixels[..., 3] = 255; pixels[0, 1] = (10, 20, 30, 255)
    >>> data = encode_png(pixels)
    >>> back = np.asarray(Image.open(io.BytesIO(data)).convert("RGBA"))
    >>> bool((back == pixels).all())
    True
    """
    pixels = _rgb_or_rgba(pixels, keep_alpha)
    height, width, channels = pixels.shape
    return _png(width, height, channels, zlib.compress(_rows(pixels).data, level))


#: zlib stream header for deflate with a 32 KiB window (RFC 1950: 0x78 0x01, a multiple of 31).
_ZLIB_HEADER = b"\x78\x01"
#: A final, empty deflate block (fixed Huffman codes, only the end-of-block code; RFC 1951, 3.2.6).
_LAST_BLOCK = b"\x03\x00"


class FrameEncoder:
    """PNG frames of one figure, deflating again only the bands of rows that changed.

    A slider step changes a few plots; most rows of the picture stay as they
    were. Each band of ``band`` rows is deflated on its own (a fresh
    compressor, ended by a sync flush, so the pieces join into one valid
    deflate stream, RFC 1951) and kept; the next frame deflates only the
    bands whose pixels differ and joins the kept pieces with the new ones,
    with the zlib header and the Adler-32 of all rows (RFC 1950). The PNG
    decodes to exactly the pixels given, as :func:`encode_png`'s does.

    Examples
    --------
    >>> import io
    >>> import numpy as np
    >>> from PIL import Image
    >>> frames = FrameEncoder(band=2)
    >>> pixels = np.full((5, 3, 4), 255, np.uint8)
    >>> first = frames.encode(pixels)
    >>> pixels[4, 0] = (1, 2, 3, 255)  # one pixel of the last band changes
    >>> back = np.asarray(Image.open(io.BytesIO(frames.encode(pixels))).convert("RGBA"))
    >>> bool((back == pixels).all()), frames.deflated_bands
    (True, 1)
    """

    def __init__(self, *, band: int = 16, level: int = 1) -> None:
        self.band = int(band)
        self.level = int(level)
        self._last: np.ndarray | None = None  # the last frame's pixel rows, as words to compare
        self._kind: tuple = ()  # their shape, type and whether the alpha channel is dropped
        self._pieces: list[tuple[bytes, int, int]] = []  # per band: deflated bytes, Adler-32, length
        #: bands deflated by the last :meth:`encode` (all of them for a first or a resized frame)
        self.deflated_bands = 0

    def encode(self, pixels: np.ndarray, *, keep_alpha: bool | None = None) -> bytes:
        """PNG bytes of an (height, width, 3 or 4) uint8 image (see :func:`encode_png`)."""
        pixels = np.ascontiguousarray(_checked(pixels))
        height, width, channels = pixels.shape
        if channels == 4 and keep_alpha is None:
            keep_alpha = not _opaque(pixels)
        drop = channels == 4 and not keep_alpha  # the alpha channel dropped band by band, as needed
        flat = pixels.reshape(height, width * channels)
        words = flat.view(np.uint32) if flat.shape[1] % 4 == 0 else flat  # a quarter of the comparisons
        band = self.band
        starts = range(0, height, band)
        kind = (words.shape, words.dtype, drop)
        if self._last is None or self._kind != kind:
            dirty = [True] * len(starts)
            self._pieces = [(b"", 1, 0)] * len(starts)
        else:
            changed = (words != self._last).any(axis=1)
            dirty = [bool(changed[k : k + band].any()) for k in starts]
        self._last, self._kind = words.copy(), kind
        for i, k in enumerate(starts):
            if dirty[i]:
                part = pixels[k : k + band]
                rows = _rows(_without_alpha(part) if drop else part)
                deflate = zlib.compressobj(self.level, zlib.DEFLATED, -15)
                piece = deflate.compress(rows.data) + deflate.flush(zlib.Z_SYNC_FLUSH)
                self._pieces[i] = (piece, zlib.adler32(rows.data), rows.size)
        self.deflated_bands = sum(dirty)
        check = 1  # the Adler-32 of no bytes
        for _, adler, size in self._pieces:
            check = _adler32_combine(check, adler, size)
        idat = b"".join([_ZLIB_HEADER, *(piece for piece, _, _ in self._pieces), _LAST_BLOCK])
        return _png(width, height, 3 if drop else channels, idat + struct.pack(">I", check))


_ADLER_BASE = 65521  # the largest prime below 2**16 (RFC 1950, section 9)


def _adler32_combine(first: int, second: int, length: int) -> int:
    """The Adler-32 of two byte strings joined, from theirs and the second's length (zlib's method).

    >>> a, b = b"launch ", b"window"
    >>> _adler32_combine(zlib.adler32(a), zlib.adler32(b), len(b)) == zlib.adler32(a + b)
    True
    """
    rem = length % _ADLER_BASE
    sum1 = first & 0xFFFF
    sum2 = (rem * sum1) % _ADLER_BASE
    sum1 += (second & 0xFFFF) + _ADLER_BASE - 1
    sum2 += (first >> 16) + (second >> 16) + _ADLER_BASE - rem
    sum1 %= _ADLER_BASE
    sum2 %= _ADLER_BASE
    return sum1 | (sum2 << 16)
