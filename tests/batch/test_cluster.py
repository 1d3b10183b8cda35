"""Batches on a Dask LocalCluster (worker processes): the results equal one in-process batch
call bit for bit (identity: the same Rust routine on the same rows), a bad model is named by
its index in the whole batch, and result objects travel between processes (pickle)."""

import pickle

import numpy as np
import pytest

import statewright as sw

dask = pytest.importorskip("dask")
da = pytest.importorskip("dask.array")
distributed = pytest.importorskip("distributed")

from statewright.cluster import realize_batch_dask, transfer_function_batch_dask  # noqa: E402


@pytest.fixture(scope="module")
def client():
    cluster = distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None, silence_logs=40
    )
    c = distributed.Client(cluster)
    yield c
    c.close()
    cluster.close()


def models(count, order, seed=0):
    rng = np.random.default_rng(seed)
    den = np.hstack([np.ones((count, 1)), rng.standard_normal((count, order))])
    num = rng.standard_normal((count, order + 1))
    return num, den


def test_round_trip_on_the_cluster_equals_one_local_batch(client):
    num, den = models(5000, 6)
    dnum = da.from_array(num, chunks=(700, -1))
    A, B, C, D = realize_batch_dask(dnum, den)
    tnum, tden = transfer_function_batch_dask(A, B, C, D)
    got = dask.compute(A, B, C, D, tnum, tden)
    ref_a, ref_b, ref_c, ref_d = sw.realize_batch(num, den)
    ref_num, ref_den = sw.transfer_function_batch(ref_a, ref_b, ref_c, ref_d)
    for x, y in zip(got, (ref_a, ref_b, ref_c, ref_d, ref_num, ref_den)):
        np.testing.assert_array_equal(x, y)
    # (identity) the round trip returns the monic input within the certified accuracy
    np.testing.assert_allclose(got[5], den, rtol=0, atol=0)
    np.testing.assert_allclose(got[4][:, 0, 0], num, rtol=1e-13, atol=1e-13)


def test_bad_model_is_named_by_its_global_index(client):
    num, den = models(1000, 4, seed=1)
    den[737, 2] = np.nan
    A, B, C, D = realize_batch_dask(da.from_array(num, chunks=(300, -1)), da.from_array(den, chunks=(300, -1)))
    with pytest.raises(sw.ModelError, match="model 737 of the batch"):
        dask.compute(A, B, C, D)


def test_results_pickle():
    r = sw.realize([1.0, 2.0], [1.0, 3.0, 2.0], "modal")
    s = sw.controllability_staircase(np.diag([-1.0, -2.0, -3.0]), np.array([[1.0], [1.0], [0.0]]))
    k = sw.kalman_decomposition(np.diag([-1.0, -2.0]), np.array([[1.0], [0.0]]), np.array([[1.0, 1.0]]), [[0.0]])
    r2, s2, k2 = pickle.loads(pickle.dumps((r, s, k)))
    assert r2 == r and dict(r2.info) == dict(r.info)
    assert s2.rank == s.rank and s2.blocks == s.blocks and np.array_equal(s2.a, s.a)
    assert s2.rank_gaps == s.rank_gaps
    assert k2.sizes == k.sizes and np.array_equal(k2.transform, k.transform) and k2.realization == k.realization
