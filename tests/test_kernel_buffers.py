"""The kernel-row buffer pool: memory goes from one KernelColumns to the next, never to two
at once, and a cache on a reused buffer computes what a fresh one does."""

import gc

import numpy as np

from solver.kernels import rbf_matrix
from solver.qp import kernel_cache
from solver.qp.kernel_cache import BUFFERS, KernelColumns


def _gaussian(X, gamma):
    return lambda A, B: rbf_matrix(A, B, gamma)


def _points(n, seed=0):
    return np.random.default_rng(seed).normal(size=(n, 2))


def _memory(columns):
    return columns.store.base if columns.store.base is not None else columns.store


def _handed_back(X, gamma=1.0):
    """The memory of a cache on X that is gone (the pool emptied first)."""
    BUFFERS.clear()
    gone = KernelColumns(X, _gaussian(X, gamma))
    gone.fill(np.arange(len(X)))
    memory = _memory(gone)
    del gone
    gc.collect()
    return memory


def test_a_cache_that_is_gone_hands_its_buffer_to_the_next():
    X = _points(600)
    memory = _handed_back(X)
    second = KernelColumns(X, _gaussian(X, 1.0))
    assert np.shares_memory(_memory(second), memory)


def test_two_caches_alive_at_once_never_share_memory():
    BUFFERS.clear()
    X = _points(600)
    first = KernelColumns(X, _gaussian(X, 1.0))
    second = KernelColumns(X, _gaussian(X, 2.0))
    assert not np.shares_memory(first.store, second.store)


def test_a_reused_buffer_holds_nothing_of_the_last_fit():
    # K computed from the formula k(x, z) = exp(-gamma |x - z|^2), written out here
    memory = _handed_back(_points(600), gamma=5.0)
    Z = _points(600, seed=1)
    columns = KernelColumns(Z, _gaussian(Z, 0.5))
    assert np.shares_memory(_memory(columns), memory)
    idx = np.arange(0, 600, 7)
    squared = ((Z[idx][:, None, :] - Z[idx][None, :, :]) ** 2).sum(axis=2)
    np.testing.assert_allclose(columns.block(idx), np.exp(-0.5 * squared), rtol=1e-14)


def test_small_caches_leave_the_kept_buffer_alone():
    X = _points(600)
    memory = _handed_back(X)
    small = KernelColumns(X[:50], _gaussian(X[:50], 1.0))
    assert small.store.size < kernel_cache.SMALL
    assert not np.shares_memory(small.store, memory)
    again = KernelColumns(X, _gaussian(X, 1.0))
    assert np.shares_memory(_memory(again), memory)


def test_a_block_larger_than_the_cache_is_computed_afresh():
    # K from the formula k(x, z) = exp(-gamma |x - z|^2), written out here
    X = _points(300)
    columns = KernelColumns(X, _gaussian(X, 2.0), budget=8 * 300 * 70)   # 70 columns fit
    idx = np.arange(0, 300, 2)                                           # 150 asked for
    squared = ((X[idx][:, None, :] - X[idx][None, :, :]) ** 2).sum(axis=2)
    np.testing.assert_allclose(columns.block(idx), np.exp(-2.0 * squared), rtol=1e-12,
                               atol=1e-15)
    assert (columns.slot >= 0).sum() == 0          # nothing kept: the buffer is untouched


def test_fresh_memory_is_zeroed_writable_float64_and_goes_when_dropped():
    gc.collect()
    before = kernel_cache.MAPPED.now
    buffer = kernel_cache._fresh(3 * 2**17 + 5)       # an odd size, above SMALL
    assert kernel_cache.MAPPED.now == before + 8 * buffer.size   # counted while alive
    assert buffer.dtype == np.float64 and buffer.size == 3 * 2**17 + 5
    assert buffer.flags.writeable and buffer.flags.c_contiguous
    assert not buffer.any()
    buffer[:] = 2.0
    assert buffer.sum() == 2.0 * buffer.size
    mapped = buffer.base.obj                          # the anonymous map under the array
    del buffer
    gc.collect()
    mapped.close()        # raises BufferError while an array still uses the memory
    del mapped
    gc.collect()
    assert kernel_cache.MAPPED.now == before
