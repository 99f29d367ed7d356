"""Running sweeps: serial, local process pool and a real Dask LocalCluster give the same table; interrupted
and killed sweeps resume without losing or recomputing a case; failing cases are recorded; the file opens
with xarray and every axis has a scale; the CLI exits with 2 on a bad spec.

Tiny planets throughout (64 mantle nodes, 0.05-0.5 Gyr)."""

import json
import os
import signal
import subprocess
import sys
import tempfile
import time

import h5py
import numpy as np
import pytest
from click.testing import CliRunner

from meltzone.cli import main
from meltzone.constants import EARTH_RADIUS
from meltzone.errors import MeltzoneError
from meltzone.sweep import (FAILED, OK, REJECTED, plot_sweep, progress_path, read_sweep,
                            run_sweep, summary_dict)

TINY = {"interior": {"mantle_nodes": 64}, "run": {"end_time_gyr": 0.05}}


def lhs_spec(n=8, seed=21, end_time_gyr=0.05):
    return {"sweep": {"mode": "latin-hypercube", "samples": n, "seed": seed},
            "base": {"interior": {"mantle_nodes": 64}, "run": {"end_time_gyr": end_time_gyr}},
            "parameters": {"planet.mass_earth": {"min": 0.6, "max": 12.0, "scale": "log"},
                           "planet.core_mass_fraction": {"min": 0.15, "max": 0.45}}}


def table(path):
    """Every case variable but the wall time, and the event table."""
    d = read_sweep(path)
    cases = {k: v for k, v in d["cases"].items() if k != "wall_time_s"}
    return cases, d["events"]


def assert_same(a, b):
    (ca, ea), (cb, eb) = a, b
    assert ca.keys() == cb.keys() and ea.keys() == eb.keys()
    for group_a, group_b in ((ca, cb), (ea, eb)):
        for k in group_a:
            x, y = group_a[k], group_b[k]
            if x.dtype.kind == "f":
                assert np.array_equal(x, y, equal_nan=True), k  # bitwise-equal values (NaN where no value)
            else:
                assert list(x) == list(y), k


@pytest.fixture(scope="module")
def serial_file(tmp_path_factory):
    path = tmp_path_factory.mktemp("serial") / "serial.h5"
    run_sweep(lhs_spec(), path, executor="serial", progress=False)
    return path


@pytest.fixture(scope="module")
def dask_client(tmp_path_factory):
    """One real LocalCluster for the module: two worker processes on loopback, no dashboard, scratch in tmp."""
    pytest.importorskip("distributed")
    import dask
    from distributed import Client, LocalCluster

    scratch = tmp_path_factory.mktemp("dask-scratch")
    with dask.config.set({"temporary-directory": str(scratch)}):
        cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                               dashboard_address=None, local_directory=str(scratch),
                               scheduler_kwargs={"dashboard_address": "127.0.0.1:0"})
        client = Client(cluster)
    yield client
    client.close()
    cluster.close()


# ---------------------------------------------------------------- executors agree
def test_process_pool_matches_serial(serial_file, tmp_path):
    out = tmp_path / "pool.h5"
    report = run_sweep(lhs_spec(), out, workers=2, progress=False)
    assert report.n_cases == 8 and sorted(report.ran) == list(range(8))
    assert_same(table(out), table(serial_file))
    assert not progress_path(out).exists()  # checkpoint removed after the final write


def test_dask_client_matches_serial(serial_file, tmp_path, dask_client):
    out = tmp_path / "dask.h5"
    report = run_sweep(lhs_spec(), out, executor=dask_client, progress=False)
    assert "dask" in report.executor
    assert_same(table(out), table(serial_file))
    assert dask_client.status == "running"  # the caller's client is left open
    again = tmp_path / "dask-again.h5"  # a second sweep on the same client
    run_sweep(lhs_spec(), again, executor=dask_client, progress=False)
    assert_same(table(again), table(serial_file))


def test_dask_scheduler_address_matches_serial(serial_file, tmp_path, dask_client):
    address = dask_client.scheduler.address
    assert address.startswith("tcp://127.0.0.1:")
    out = tmp_path / "addr.h5"
    run_sweep(lhs_spec(), out, scheduler=address, progress=False)
    assert_same(table(out), table(serial_file))


def test_dask_local_executor_matches_binds_loopback_and_cleans_up(serial_file, tmp_path):
    """executor="dask-local": same table; every listening socket of this process tree (schedulers, nannies,
    workers, HTTP routes) is on 127.0.0.1 while it runs; its scratch folder is gone afterwards."""
    psutil = pytest.importorskip("psutil")
    before = set(os.listdir(tempfile.gettempdir()))
    listening = []

    def sockets(info):
        if listening:
            return
        me = psutil.Process()
        for p in [me, *me.children(recursive=True)]:
            try:
                listening.extend(c.laddr for c in p.net_connections(kind="inet") if c.status == psutil.CONN_LISTEN)
            except (psutil.Error, OSError):
                pass

    out = tmp_path / "dask-local.h5"
    report = run_sweep(lhs_spec(), out, executor="dask-local", workers=2, progress=sockets)
    assert report.executor == "dask LocalCluster (2 workers)"
    assert len(listening) >= 4 and all(a.ip == "127.0.0.1" for a in listening), listening
    assert_same(table(out), table(serial_file))
    left = {n for n in set(os.listdir(tempfile.gettempdir())) - before if n.startswith("meltzone-dask-")}
    assert not left


# ---------------------------------------------------------------- failures
def test_failing_cases_are_recorded_and_the_sweep_finishes(tmp_path):
    spec = {"sweep": {"mode": "grid"}, "base": TINY,
            "parameters": {"planet.mass_earth": {"values": [1.0, 150.0, 0.3]},
                           "run.max_steps": {"values": [200000, 100]}}}
    out = tmp_path / "fail.h5"
    with pytest.warns(UserWarning, match="recorded as failed"):
        report = run_sweep(spec, out, executor="serial", progress=False)
    c = read_sweep(out)["cases"]
    assert report.n_cases == 6
    status, err = c["status"], list(c["error"])
    # case order: (1, 2e5), (1, 100), (150, 2e5), (150, 100), (0.3, 2e5), (0.3, 100)
    assert list(status) == [OK, FAILED, FAILED, FAILED, OK, FAILED]
    assert "run.max_steps = 100" in err[1]
    assert err[2].startswith("ConfigError: planet.mass_earth = 150.0")
    assert err[0] == "" and err[4] == ""
    assert "calibrated range" in c["warning"][4]
    assert np.isnan(c["magma_ocean_end_yr"][2]) and c["basal_layer_formed"][2] == -1
    assert np.isfinite(c["final_upper_temperature_k"][0])
    s = summary_dict(out)
    assert s["n_failed"] == 4 and sum(f["count"] for f in s["failures"]) == 4


# ---------------------------------------------------------------- file layout
def test_file_opens_with_xarray_and_every_axis_has_a_scale(serial_file):
    xr = pytest.importorskip("xarray")
    with xr.open_dataset(serial_file, engine="h5netcdf", group="cases") as ds:
        assert ds.sizes["case"] == 8
        assert ds["mass_earth"].attrs["units"] == "Earth masses"
        assert ds["mass_earth"].attrs["config_key"] == "planet.mass_earth"
        assert ds["magma_ocean_end_yr"].attrs["units"] == "yr"
        assert ds["magma_ocean_end_yr"].dtype == np.float64  # "yr" is not decoded to timedeltas
        assert ds["status"].dtype == np.int8
    with xr.open_dataset(serial_file, engine="h5netcdf", group="events") as ev:
        assert set(ev.data_vars) >= {"case", "time_yr", "kind", "layer", "depth_m", "pressure_pa"}
        assert ev.sizes["event"] > 0
    missing = []
    with h5py.File(serial_file, "r") as f:
        assert f.attrs["meltzone_kind"] == "sweep"
        assert "[sweep]" in f.attrs["sweep_spec_toml"] and f.attrs["created_utc"]
        for gname in ("cases", "events"):
            for name, ds in f[gname].items():
                assert "units" in ds.attrs, f"{gname}/{name} has no units"
                if ds.is_scale:
                    continue
                missing += [f"{gname}/{name}[{i}]" for i in range(ds.ndim) if len(ds.dims[i]) == 0]
    assert not missing, f"axes without a scale: {missing}"


def test_events_table_matches_counts(serial_file):
    d = read_sweep(serial_file)
    counts = np.bincount(d["events"]["case"], minlength=8)
    assert np.array_equal(counts, d["cases"]["n_events"].astype(int))
    assert np.all(np.diff(d["events"]["case"]) >= 0)


# ---------------------------------------------------------------- observed mode
def test_observed_mode_inversion_rejections_and_probabilities(tmp_path):
    """The evolved planet has the drawn radius (the inversion fitted it, within 1e-3 relative); draws too
    large for a coreless rock are rejected; probabilities are k/n with SE sqrt(p(1-p)/n) (binomial)."""
    spec = {"sweep": {"mode": "observed", "samples": 8, "seed": 4}, "base": {"interior": {"mantle_nodes": 64}},
            "observed": {"mass_earth": 4.0, "mass_sigma": 0.3, "radius_earth": 1.52, "radius_sigma": 0.06,
                         "age_gyr": 0.05}}
    out = tmp_path / "obs.h5"
    report = run_sweep(spec, out, executor="serial", progress=False)
    c = read_sweep(out)["cases"]
    ok = c["status"] == OK
    rej = c["status"] == REJECTED
    assert report.n_rejected == int(rej.sum()) >= 1 and ok.sum() >= 3
    assert all("no rocky composition" in e for e in c["error"][rej])
    assert np.all(np.isnan(c["core_mass_fraction"][rej]))
    cmf = c["core_mass_fraction"][ok]
    assert np.all((cmf >= 0.0) & (cmf <= 0.8))
    assert np.allclose(c["radius_m"][ok] / EARTH_RADIUS, c["radius_earth"][ok], rtol=1e-3)
    s = summary_dict(out)["observed"]
    n = int(ok.sum())
    for name in ("magma_ocean_at_age", "basal_layer_by_age", "melting_at_age"):
        k = int(np.sum(c[name][ok] == 1))
        p = k / n
        assert s[name]["n"] == n and s[name]["p"] == pytest.approx(p)
        assert s[name]["se"] == pytest.approx(np.sqrt(p * (1 - p) / n))
    assert s["rejected"]["k"] == int(rej.sum()) and s["rejected"]["n"] == 8


# ---------------------------------------------------------------- interrupt and resume
def _checkpointed(out):
    rows = {}
    for part in sorted(progress_path(out).glob("part-*.json")):
        for row in json.loads(part.read_text())["results"]:
            assert row["case"] not in rows, "a case checkpointed twice"
            rows[row["case"]] = row
    return rows


def _assert_checkpoint_kept(out, rows):
    """Checkpointed metric values are in the final file bit for bit, and so is each case's wall time (which
    differs between two runs of a case: a checkpointed case was not run again)."""
    c = read_sweep(out)["cases"]
    for i, row in rows.items():
        assert c["status"][i] == row["status"]
        assert c["wall_time_s"][i] == row["wall_time_s"], i
        for k, v in row["metrics"].items():
            assert np.array_equal(c[k][i], v, equal_nan=True), (i, k)


@pytest.mark.parametrize("after_rename", [True, False])
def test_interrupt_inside_a_batch_write_neither_repeats_nor_drops_a_case(tmp_path, monkeypatch, after_rename):
    """Ctrl-C can land while a batch is being written: just after its rename (the batch is on disk) or just
    before it (it is not). The flush on the way out then writes each case exactly once."""
    from meltzone.sweep import checkpoint as ck

    ckpt = ck.Checkpoint(tmp_path / "p", "id", 10, every=100, seconds=1e9)
    ckpt.open(resume=False)
    real = os.replace

    def interrupted(src, dst):
        if after_rename:
            real(src, dst)
        raise KeyboardInterrupt

    ckpt.add([{"case": 0}])  # the first task is written at once
    ckpt.add([{"case": 1}, {"case": 2}])
    monkeypatch.setattr(ck.os, "replace", interrupted)
    with pytest.raises(KeyboardInterrupt):
        ckpt.flush()
    monkeypatch.setattr(ck.os, "replace", real)
    ckpt.add([{"case": 3}])
    ckpt.flush()  # as on the way out of an interrupted sweep
    rows = [r["case"] for part in sorted(ckpt.folder.glob("part-*.json"))
            for r in json.loads(part.read_text())["results"]]
    assert rows == [0, 1, 2, 3]


def test_ctrl_c_then_resume_runs_only_missing_cases(serial_file, tmp_path):
    out = tmp_path / "int.h5"

    def interrupt(info):
        if info["done"] >= 3:
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        run_sweep(lhs_spec(), out, executor="serial", progress=interrupt, checkpoint_every=1)
    assert not out.exists()
    rows = _checkpointed(out)
    assert sorted(rows) == [0, 1, 2]
    res = run_sweep(lhs_spec(), out, executor="serial", resume=True, progress=False)
    assert sorted(res.ran) == [3, 4, 5, 6, 7] and res.resumed == 3
    _assert_checkpoint_kept(out, rows)
    assert_same(table(out), table(serial_file))
    # the checkpoint guards against mixing specs and against a silent restart
    again = run_sweep(lhs_spec(), out, executor="serial", resume=True, progress=False)
    assert again.ran == []  # already complete


def test_first_finished_task_is_checkpointed_at_once(tmp_path):
    """The first finished task is written to the checkpoint at once, even when neither the count
    (checkpoint_every) nor the time (checkpoint_seconds) is reached; later cases wait for one of those. The
    serial executor makes the order exact (one case per task for 8 cases)."""
    out = tmp_path / "early.h5"
    parts = {}

    def look(info):
        parts[info["done"]] = len(list(progress_path(out).glob("part-*.json")))
        if info["done"] >= 2:
            raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        run_sweep(lhs_spec(), out, executor="serial", progress=look, checkpoint_every=64,
                  checkpoint_seconds=1e9)
    assert parts == {0: 0, 1: 1, 2: 1}
    assert sorted(_checkpointed(out)) == [0, 1]  # the second case was written on the way out


def test_checkpoint_of_another_spec_is_refused(tmp_path):
    out = tmp_path / "x.h5"
    with pytest.raises(KeyboardInterrupt):
        run_sweep(lhs_spec(), out, executor="serial", checkpoint_every=1,
                  progress=lambda i: (_ for _ in ()).throw(KeyboardInterrupt) if i["done"] >= 1 else None)
    with pytest.raises(MeltzoneError, match="add --resume"):
        run_sweep(lhs_spec(), out, executor="serial", progress=False)
    with pytest.raises(MeltzoneError, match="different sweep spec"):
        run_sweep(lhs_spec(seed=99), out, executor="serial", resume=True, progress=False)


def _session_processes(sid):
    import psutil

    found = []
    for p in psutil.process_iter(["pid"]):
        try:
            if os.getsid(p.pid) == sid:
                found.append(p.pid)
        except OSError:
            pass
    return found


SLOW_SPEC = """
[sweep]
mode = "latin-hypercube"
samples = 40
seed = 8
[base.interior]
mantle_nodes = 64
[base.run]
end_time_gyr = 0.5
[parameters."planet.mass_earth"]
min = 0.6
max = 12.0
scale = "log"
[parameters."planet.core_mass_fraction"]
min = 0.15
max = 0.45
"""


def _start_cli_sweep(spec_path, out, parts):
    """The CLI in its own session (as from a terminal, SIGINT at its default), stopped at `parts` batches."""
    proc = subprocess.Popen([sys.executable, "-m", "meltzone.cli", "sweep", str(spec_path), "-o", str(out),
                             "--workers", "2", "--checkpoint-every", "2"], start_new_session=True,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))
    deadline = time.monotonic() + 600  # an upper bound for a stuck sweep only, far above any loaded machine
    while len(list(progress_path(out).glob("part-*.json"))) < parts:
        assert proc.poll() is None, "the sweep ended before it could be stopped"
        assert time.monotonic() < deadline, "no checkpoint appeared"
        time.sleep(0.02)
    return proc


def _wait_session_gone(sid, seconds=120):
    deadline = time.monotonic() + seconds
    while _session_processes(sid) and time.monotonic() < deadline:
        time.sleep(0.1)
    return not _session_processes(sid)


def test_kill_minus_9_then_resume(tmp_path):
    """kill -9 of the client mid-sweep: its workers exit by themselves; --resume finishes, every case present
    once, none of the checkpointed ones recomputed, their values kept bit for bit."""
    pytest.importorskip("psutil")
    spec_path = tmp_path / "spec.toml"
    spec_path.write_text(SLOW_SPEC)
    out = tmp_path / "killed.h5"
    proc = _start_cli_sweep(spec_path, out, 3)
    try:
        os.kill(proc.pid, signal.SIGKILL)
        proc.communicate(timeout=10)
        assert _wait_session_gone(proc.pid), "pool workers outlived their client"  # orphans notice and exit
    finally:
        if proc.poll() is None or _session_processes(proc.pid):
            try:
                os.killpg(proc.pid, signal.SIGKILL)  # the session we started
            except ProcessLookupError:
                pass
    assert not out.exists()
    rows = _checkpointed(out)
    assert 0 < len(rows) < 40
    res = run_sweep(spec_path, out, workers=2, resume=True, progress=False)
    assert set(res.ran).isdisjoint(rows) and set(res.ran) | set(rows) == set(range(40))
    assert len(res.ran) == len(set(res.ran))
    _assert_checkpoint_kept(out, rows)
    c = read_sweep(out)["cases"]
    assert list(c["case"]) == list(range(40)) and np.all(c["status"] == OK)


def test_ctrl_c_of_the_cli_stops_workers_and_resumes(tmp_path):
    """SIGINT to the whole process group (Ctrl-C in a terminal) once the checkpoint holds a batch: exit 130
    with a hint and no traceback, the workers stopped, the finished cases checkpointed; --resume then
    completes every case exactly once (none lost, none repeated, none recomputed). Waits on observable
    state (a batch in the checkpoint folder), never on elapsed time, and asserts nothing about how many
    cases had finished when the signal came."""
    pytest.importorskip("psutil")
    spec_path = tmp_path / "spec.toml"
    spec_path.write_text(SLOW_SPEC)
    out = tmp_path / "ctrlc.h5"
    proc = _start_cli_sweep(spec_path, out, 1)
    try:
        os.killpg(proc.pid, signal.SIGINT)
        _, err = proc.communicate(timeout=300)
        assert proc.returncode == 130 and "--resume" in err and "Traceback" not in err
        assert _wait_session_gone(proc.pid), "pool workers outlived the interrupted client"
    finally:
        if proc.poll() is None or _session_processes(proc.pid):
            try:
                os.killpg(proc.pid, signal.SIGKILL)
            except ProcessLookupError:
                pass
    rows = _checkpointed(out)  # (asserts that no case was checkpointed twice)
    assert 1 <= len(rows) < 40 and not out.exists()
    res = CliRunner().invoke(main, ["sweep", str(spec_path), "-o", str(out), "--resume", "--workers", "2"])
    assert res.exit_code == 0, res.output
    assert f"({len(rows)} from the checkpoint); {40 - len(rows)} handled by this call" in res.output
    c = read_sweep(out)["cases"]
    assert list(c["case"]) == list(range(40)) and np.all(c["status"] == OK)
    _assert_checkpoint_kept(out, rows)
    assert not progress_path(out).exists()


def test_killed_worker_restarts_the_pool(serial_file, tmp_path):
    """kill -9 of one pool worker: the pool is restarted and the sweep finishes with the same table."""
    psutil = pytest.importorskip("psutil")
    killed = []
    older = {p.pid for p in psutil.Process().children()}  # e.g. the Dask fixture's nannies: not ours to kill

    def kill_one(info):
        if info["done"] >= 1 and not killed:
            workers = [p for p in psutil.Process().children() if p.pid not in older
                       and "multiprocessing.spawn" in " ".join(p.cmdline()) and p.is_running()]
            if workers:
                workers[0].send_signal(signal.SIGKILL)  # our own pool's worker
                killed.append(workers[0].pid)

    out = tmp_path / "restart.h5"
    with pytest.warns(UserWarning, match="restarting the process pool"):
        run_sweep(lhs_spec(), out, workers=2, progress=kill_one)
    assert killed
    assert_same(table(out), table(serial_file))


# ---------------------------------------------------------------- detail, summary, plots
def test_keep_detail_writes_run_files(tmp_path):
    from meltzone import results

    if not hasattr(results, "write"):
        pytest.skip("meltzone.results.write not available")
    spec = {"sweep": {"mode": "grid"}, "base": TINY, "parameters": {"planet.mass_earth": {"values": [1.0, 3.0]}}}
    out = tmp_path / "d.h5"
    run_sweep(spec, out, executor="serial", progress=False, keep_detail=True)
    files = sorted((tmp_path / "d.h5.detail").glob("case-*.h5"))
    assert [f.name for f in files] == ["case-000000.h5", "case-000001.h5"]
    assert results.file_kind(files[0]) == "run"


def test_print_summary_json_and_table(serial_file, capsys):
    from meltzone.report import print_sweep_summary as print_summary

    print_summary(serial_file, as_json=True)
    data = json.loads(capsys.readouterr().out)
    assert data["n_cases"] == 8 and data["n_ok"] == 8 and data["mode"] == "latin-hypercube"
    m = data["metrics"]["magma_ocean_end_yr"]
    assert m["unit"] == "yr" and m["min"] <= m["median"] <= m["max"]
    print_summary(serial_file)
    text = capsys.readouterr().out
    assert "magma_ocean_end_yr" in text and "model estimates" in text


def test_plots(serial_file, tmp_path):
    for fig in ("lifetime", "probability"):
        out = plot_sweep(serial_file, fig, tmp_path / f"{fig}.png")
        assert out.stat().st_size > 5000
    with pytest.raises(MeltzoneError, match="lifetime"):
        plot_sweep(serial_file, "meltmap", tmp_path / "x.png")
    with pytest.raises(MeltzoneError, match="outcome"):
        plot_sweep(serial_file, "probability", tmp_path / "x.png", outcome="nothing")


# ---------------------------------------------------------------- CLI
def test_cli_example_is_a_valid_spec(tmp_path):
    res = CliRunner().invoke(main, ["sweep", "--example"])
    assert res.exit_code == 0
    p = tmp_path / "ex.toml"
    p.write_text(res.output)
    from meltzone.sweep import load_spec

    assert load_spec(p).n_cases == 32


@pytest.mark.parametrize("text,word", [
    ("[sweep]\nmode = 'zigzag'\n", "sweep.mode"),
    ("[sweep\nmode = 'grid'\n", "not valid TOML"),
    ("[sweep]\nmode = 'sobol'\nsamples = 10\nseed = 1\n[parameters.'planet.mass_earth']\nmin = 1\nmax = 2\n",
     "power of 2"),
    ("[sweep]\nmode = 'grid'\n[parameters.'planet.mass_earth']\nvalues = 'many'\n", "planet.mass_earth"),
])
def test_cli_bad_spec_exits_2(tmp_path, text, word):
    p = tmp_path / "bad.toml"
    p.write_text(text)
    res = CliRunner().invoke(main, ["sweep", str(p), "-o", str(tmp_path / "o.h5")])
    assert res.exit_code == 2, res.output
    assert word in res.output and "Traceback" not in res.output


def test_cli_usage_errors(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text("[sweep]\nmode = 'grid'\n[parameters.'planet.mass_earth']\nvalues = [1.0]\n")
    r = CliRunner()
    for args, word in ((["sweep", str(p)], "-o"), (["sweep", "-o", "x.h5"], "SPEC"),
                       (["sweep", str(p), "-o", "x.h5", "--workers", "2", "--dask-local", "2"], "exclude"),
                       (["sweep", str(p), "-o", "x.h5", "--workers", "0"], "--workers"),
                       (["sweep", "/nonexistent/spec.toml", "-o", "x.h5"], "cannot read")):
        res = r.invoke(main, args)
        assert res.exit_code == 2 and word in res.output, (args, res.output)


def test_cli_runs_and_summary_reads_the_file(tmp_path):
    p = tmp_path / "s.toml"
    p.write_text("[sweep]\nmode = 'grid'\n[base.interior]\nmantle_nodes = 64\n[base.run]\nend_time_gyr = 0.05\n"
                 "[parameters.'planet.mass_earth']\nvalues = [1.0, 2.0]\n")
    out = tmp_path / "cli.h5"
    res = CliRunner().invoke(main, ["sweep", str(p), "-o", str(out), "--workers", "1"])
    assert res.exit_code == 0, res.output
    assert "2 cases, 0 failed" in res.output
    progress_path(out).mkdir()  # a leftover checkpoint without --resume is refused, not overwritten
    (progress_path(out) / "manifest.json").write_text("{}")
    res = CliRunner().invoke(main, ["sweep", str(p), "-o", str(out)])
    assert res.exit_code == 2 and "--resume" in res.output
    res = CliRunner().invoke(main, ["summary", str(out), "--json"])
    assert res.exit_code == 0, res.output
    assert json.loads(res.output)["n_cases"] == 2


def test_dashboard_only_when_asked_and_only_for_a_local_cluster(tmp_path):
    """The dashboard option belongs to --dask-local; elsewhere it is a one-line error (exit 2)."""
    from click.testing import CliRunner

    from meltzone.cli import main as cli_main

    spec = tmp_path / "s.toml"
    spec.write_text('[sweep]\nmode = "grid"\n[base.run]\nend_time_gyr = 0.01\n'
                    '[parameters."planet.mass_earth"]\nvalues = [1.0]\n')
    res = CliRunner().invoke(cli_main, ["sweep", str(spec), "-o", str(tmp_path / "o.h5"),
                                        "--dashboard", "127.0.0.1:8787"])
    assert res.exit_code == 2 and "--dask-local" in res.output and "Traceback" not in res.output


def test_magma_ocean_at_age_follows_reformation():
    """The magma-ocean-at-age flag follows the events: present before the end, absent after it, present again
    after a magma-ocean-reformed event (a constructed event list)."""
    from meltzone.sweep.worker import _magma_ocean_at

    summary = {"magma_ocean_end_yr": 1e5, "events": [
        {"time_yr": 5e8, "kind": "magma-ocean-reformed"}, {"time_yr": 1e5, "kind": "magma-ocean-ended"}]}
    assert [_magma_ocean_at(summary, None, age) for age in (1e3, 1e6, 1e9)] == [True, False, True]
    assert not _magma_ocean_at({"magma_ocean_end_yr": 0.0, "events": []}, None, 1e3)
