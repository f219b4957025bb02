"""Elementwise kernels over large broadcast inputs, in cache-sized blocks of the flattened cases.

A kernel ``kernel(*inputs, out=outputs)`` computes its outputs from inputs of
any broadcastable shapes and writes them in place. :func:`blockwise` runs it
over the broadcast shape block by block, whatever the layout: the cases are
cut along the last axes that together hold more than one block, so a shape of
(1, 10^7) or (2, 5 10^6) is worked through in blocks as (10^7,) is, and the
temporaries of one block stay in cache. An input that is broadcast along the
cut axis is passed whole, so work on a short axis (``cos nu`` of a grid of burn
points x delta-v) is done once per block, not once per case.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from math import prod

import numpy as np

__all__ = ["BLOCK", "blockwise"]

#: Cases per block: the temporaries of one block stay in the CPU cache.
BLOCK = 16384


def blockwise(
    kernel: Callable[..., object], arrays: Sequence[np.ndarray], floats: int, flags: bool = False
) -> tuple[np.ndarray, ...]:
    """Run ``kernel`` over the broadcast of ``arrays``; return its outputs.

    ``floats`` float outputs of the broadcast shape are made with
    ``np.empty``; with ``flags`` one ``int8`` output is added, made with
    ``np.zeros`` (its pages cost no memory until a kernel writes to them).
    Inputs of size 1 (scalars) stay size 1. Small inputs run in one call.
    """
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    if not shape:  # one case: work on 1-element arrays, so in-place steps hold
        outputs = blockwise(kernel, [a.reshape(1) for a in arrays], floats, flags)
        return tuple(o.reshape(()) for o in outputs)
    outputs = [np.empty(shape) for _ in range(floats)]
    if flags:
        outputs.append(np.zeros(shape, dtype=np.int8))
    ndim = len(shape)
    arrays = [a.reshape((1,) * (ndim - a.ndim) + a.shape) for a in arrays]
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        size = prod(shape)
        if size <= 2 * BLOCK:
            if size:
                kernel(*arrays, out=outputs)
            return tuple(outputs)
        # cut along `axis`; the axes after it (`inner` cases) go whole into each block
        axis, inner = ndim - 1, 1
        while axis > 0 and inner * shape[axis] <= BLOCK:
            inner *= shape[axis]
            axis -= 1
        step = max(1, BLOCK // inner)
        for outer in np.ndindex(*shape[:axis]):
            for start in range(0, shape[axis], step):
                cut = slice(start, start + step)
                block = [_block(a, outer, axis, cut) for a in arrays]
                kernel(*block, out=[o[outer + (cut,)] for o in outputs])
    return tuple(outputs)


def _block(array: np.ndarray, outer: tuple[int, ...], axis: int, cut: slice) -> np.ndarray:
    """The part of ``array`` a block at ``outer`` (indices before ``axis``) and ``cut`` reads."""
    index = tuple(0 if n == 1 else i for n, i in zip(array.shape, outer))
    return array[index + ((slice(None) if array.shape[axis] == 1 else cut),)]
