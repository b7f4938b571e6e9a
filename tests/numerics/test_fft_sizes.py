"""The FFT lengths of hcfplan.numerics.grid: smooth_fft_size gives the smallest even 5-smooth
length at or above a request (checked by exhaustive search; numerical helper, no source)."""

import pytest

from hcfplan.numerics.grid import smooth_fft_size


def _smooth(n: int) -> bool:
    for prime in (2, 3, 5):
        while n % prime == 0:
            n //= prime
    return n == 1


@pytest.mark.parametrize("request_", [1, 2, 3, 7, 31, 250, 9816, 10001, 16385])
def test_smooth_fft_size_is_the_next_even_5_smooth_length(request_):
    size = smooth_fft_size(request_)
    assert size >= request_ and size % 2 == 0 and _smooth(size)
    assert not any(k % 2 == 0 and _smooth(k) for k in range(max(request_, 2), size))


def test_smooth_fft_size_keeps_smooth_lengths():
    assert [smooth_fft_size(n) for n in (2, 10000, 4096, 3000)] == [2, 10000, 4096, 3000]
